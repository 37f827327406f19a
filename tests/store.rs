//! The record stores through the library: round trips, range scans,
//! corrections, duplicates, journal catch-up, doctor and rebuild.

use std::fs;
use std::io::Write;
use std::path::Path;

use chrono::{DateTime, Duration, FixedOffset, TimeZone, Utc};
use tankwalk::core::salinity::SalinityReading;
use tankwalk::core::units::{AmmoniaBasis, NitrogenIonBasis};
use tankwalk::model::record::*;
use tankwalk::store::journal;
use tankwalk::store::{MemStore, SledStore, Store, StoreError, TimeRange, history, repair};
use ulid::Ulid;

fn tank(id: &str) -> Target {
    Target::Tank(id.into())
}

fn system(id: &str) -> Target {
    Target::System(id.into())
}

/// 2026-12-01 07:00 at UTC+01:00, plus `minutes`.
fn morning(minutes: i64) -> DateTime<FixedOffset> {
    FixedOffset::east_opt(3600).unwrap().with_ymd_and_hms(2026, 12, 1, 7, 0, 0).unwrap() + Duration::minutes(minutes)
}

fn reading(target: Target, minutes: i64, ph: f64) -> Record {
    let mut r = Reading::new(target);
    r.measurements.temperature = Some(Temperature::celsius(25.0));
    r.measurements.ph = Some(ph);
    r.measurements.total_ammonia = Some(TotalAmmonia { value: 0.5, basis: AmmoniaBasis::N });
    Record::new(DeviceId::generate(), "Ines Varga", morning(minutes), RecordBody::Reading(r))
}

fn event(target: Target, minutes: i64, kind: EventKind) -> Record {
    Record::new(
        DeviceId::generate(),
        "Tomas Reyes",
        morning(minutes),
        RecordBody::Event(Event { target, kind, note: None }),
    )
}

fn correction(of: &Record, minutes: i64, replacement: Option<RecordBody>, reason: &str) -> Record {
    Record::new(
        DeviceId::generate(),
        "Ines Varga",
        morning(minutes),
        RecordBody::Correction(Correction {
            supersedes: of.id,
            replacement: replacement.map(Box::new),
            reason: reason.into(),
        }),
    )
}

/// One record of every kind, with every field used somewhere.
fn every_kind() -> Vec<Record> {
    let mut full = Reading::new(tank("B2-07"));
    full.measurements = Measurements {
        temperature: Some(Temperature::fahrenheit(78.5)),
        ph: Some(7.85),
        total_ammonia: Some(TotalAmmonia { value: 0.25, basis: AmmoniaBasis::Nh4 }),
        nitrite: Some(NitrogenReading { value: 0.3, basis: NitrogenIonBasis::Ion }),
        nitrate: Some(NitrogenReading { value: 12.5, basis: NitrogenIonBasis::N }),
        salinity: Some(SalinityReading::Conductivity { value_us_cm: 850.0, reference_c: 25.0 }),
        dissolved_oxygen_mg_l: Some(6.4),
        chloride_mg_l: Some(35.0),
        alkalinity: Some(Alkalinity { value: 2.4, unit: AlkalinityUnit::MeqL }),
    };
    full.observations = Observations { nervous_signs: true, excess_mucus: true, deaths: 1, ..Observations::default() };
    full.note = Some("one loach dead behind the rock; Ünïcode ok".into());
    let full = Record::new(DeviceId::generate(), "Ines Varga", morning(1), RecordBody::Reading(full));
    let mut marine = Reading::new(system("REEF-1"));
    marine.measurements.salinity = Some(SalinityReading::SpecificGravity { value: 1.0245, reference_c: 15.556 });
    marine.measurements.alkalinity = Some(Alkalinity { value: 8.0, unit: AlkalinityUnit::Dkh });
    let marine = Record::new(DeviceId::generate(), "Ines Varga", morning(2), RecordBody::Reading(marine));
    let kinds = [
        EventKind::WaterChange {
            percent: 35.0,
            source_ph: Some(7.4),
            source_tan_n_mg_l: Some(0.05),
            source_temp_c: Some(24.0),
            dechlorinated: true,
        },
        EventKind::FeedingHeld,
        EventKind::FeedingResumed,
        EventKind::Medication { class: MedicationClass::Antibiotic, name: "kanamycin".into() },
        EventKind::FilterCleaned { rinsed_in_tap_water: false },
        EventKind::SubstrateReplaced,
        EventKind::FishAdded { count: 60 },
        EventKind::DeadFishRemoved { count: 2 },
        EventKind::SaltAdded { grams: 1200.0 },
        EventKind::HeaterSetPoint { temp_c: 23.5 },
        EventKind::NitrifyingCultureAdded,
        EventKind::AmmoniaBinderAdded,
        EventKind::ZeoliteAdded,
    ];
    let mut records = vec![full.clone(), marine];
    for (i, kind) in kinds.into_iter().enumerate() {
        records.push(event(system("RACK-B"), 10 + i as i64, kind));
    }
    records.push(correction(&full, 60, Some(RecordBody::Reading(Reading::new(tank("B2-07")).with_ph(7.6))), "misread"));
    records.push(correction(&records[2].clone(), 61, None, "entered twice"));
    records
}

trait WithPh {
    fn with_ph(self, ph: f64) -> Self;
}

impl WithPh for Reading {
    fn with_ph(mut self, ph: f64) -> Reading {
        self.measurements.ph = Some(ph);
        self
    }
}

fn each_store(test: impl Fn(&mut dyn Store)) {
    test(&mut MemStore::new());
    let dir = tempfile::tempdir().unwrap();
    test(&mut SledStore::open(dir.path()).unwrap());
}

#[test]
fn every_record_kind_round_trips_and_survives_reopening() {
    each_store(|store| {
        let records = every_kind();
        let done = store.append(&records).unwrap();
        assert_eq!(done.added, records.len());
        for r in &records {
            assert_eq!(store.get(r.id).unwrap().as_ref(), Some(r));
        }
        assert_eq!(store.len().unwrap(), records.len());
        let mut all: Vec<Record> = store.all().unwrap().collect::<Result<_, _>>().unwrap();
        let mut expected = records.clone();
        all.sort_by_key(|r| r.id);
        expected.sort_by_key(|r| r.id);
        assert_eq!(all, expected);
    });
    let dir = tempfile::tempdir().unwrap();
    let records = every_kind();
    let device = {
        let mut store = SledStore::open(dir.path()).unwrap();
        assert!(store.opened().created);
        store.append(&records).unwrap();
        store.device()
    };
    let store = SledStore::open(dir.path()).unwrap();
    assert_eq!(store.device(), device, "the device id is kept");
    assert!(!store.opened().created);
    assert_eq!(store.opened().caught_up, 0);
    for r in &records {
        assert_eq!(store.get(r.id).unwrap().as_ref(), Some(r));
    }
    // The journal holds exactly the stored records, one line each, after its header.
    let scan = journal::scan(&dir.path().join(journal::FILE_NAME), 0, 1).unwrap();
    assert_eq!(scan.header.unwrap().unwrap().device, device);
    let in_journal: Vec<Record> = scan.records.into_iter().map(|l| l.record).collect();
    assert_eq!(in_journal, records);
}

#[test]
fn history_is_a_range_scan_by_target_and_time_newest_first() {
    each_store(|store| {
        let mut records = Vec::new();
        for day in 0..10 {
            records.push(reading(tank("B2-07"), day * 1440, 7.0 + day as f64 / 100.0));
            records.push(reading(tank("B2-08"), day * 1440 + 5, 7.0));
            records.push(reading(tank("B2"), day * 1440 + 6, 7.0));
            records.push(reading(system("RACK-B"), day * 1440 + 10, 7.5));
        }
        records.push(event(tank("B2-07"), 3 * 1440 + 30, EventKind::FeedingHeld));
        store.append(&records).unwrap();

        let all_b207 = store.history(&[tank("B2-07")], &TimeRange::ALL).unwrap();
        assert_eq!(all_b207.len(), 11);
        assert!(all_b207.iter().all(|r| r.body.target() == Some(&tank("B2-07"))), "no bleed from B2 or B2-08");
        assert!(all_b207.windows(2).all(|w| w[0].time_key() > w[1].time_key()), "newest first");

        // Days 2 to 4, both ends included to the millisecond.
        let since = morning(2 * 1440).with_timezone(&Utc);
        let until = morning(4 * 1440).with_timezone(&Utc);
        let window = store.history(&[tank("B2-07")], &TimeRange::new(Some(since), Some(until))).unwrap();
        assert_eq!(window.len(), 4, "three readings and the event");
        assert_eq!(window.first().unwrap().taken_at, morning(4 * 1440));
        assert_eq!(window.last().unwrap().taken_at, morning(2 * 1440));

        // A tank and its system: the system's readings are found from the tank.
        let merged = store.history(&[tank("B2-07"), system("RACK-B")], &TimeRange::ALL).unwrap();
        assert_eq!(merged.len(), 21);
        assert!(merged.windows(2).all(|w| w[0].time_key() > w[1].time_key()));

        // No target: every record in the window.
        let day0 = TimeRange::new(None, Some(morning(60).with_timezone(&Utc)));
        assert_eq!(store.history(&[], &day0).unwrap().len(), 4);
        assert!(store.history(&[tank("NOPE")], &TimeRange::ALL).unwrap().is_empty());
    });
}

#[test]
fn readings_before_1970_and_in_other_offsets_sort_by_instant() {
    each_store(|store| {
        let mut old = reading(tank("T1"), 0, 7.0);
        old.taken_at = DateTime::parse_from_rfc3339("1969-07-20T20:17:00-05:00").unwrap();
        let mut east = reading(tank("T1"), 0, 7.1);
        // 08:30 at +09:00 is 23:30 UTC the day before: earlier than 07:00 at +01:00.
        east.taken_at = DateTime::parse_from_rfc3339("2026-12-01T08:30:00+09:00").unwrap();
        let west = reading(tank("T1"), 0, 7.2);
        store.append(&[west.clone(), old.clone(), east.clone()]).unwrap();
        let ids: Vec<Ulid> = store.history(&[tank("T1")], &TimeRange::ALL).unwrap().iter().map(|r| r.id).collect();
        assert_eq!(ids, [west.id, east.id, old.id]);
        assert_eq!(store.get(east.id).unwrap().unwrap().taken_at.offset().local_minus_utc(), 9 * 3600, "offset kept");
    });
}

#[test]
fn corrections_keep_the_original_and_resolve_to_the_newest() {
    each_store(|store| {
        let original = reading(tank("B2-07"), 0, 8.2);
        let first =
            correction(&original, 30, Some(RecordBody::Reading(Reading::new(tank("B2-07")).with_ph(7.2))), "typo");
        // A second correction, of the first one, made later.
        let second =
            correction(&first, 90, Some(RecordBody::Reading(Reading::new(tank("B2-07")).with_ph(7.4))), "re-tested");
        store.append(std::slice::from_ref(&original)).unwrap();
        store.append(&[first.clone(), second.clone()]).unwrap();

        assert_eq!(store.get(original.id).unwrap().unwrap(), original, "the original stays");
        assert_eq!(store.corrections_of(original.id).unwrap(), vec![first.clone()]);
        assert_eq!(store.corrections_of(first.id).unwrap(), vec![second.clone()]);

        let entries = history::entries(store, &[tank("B2-07")], &TimeRange::ALL).unwrap();
        assert_eq!(entries.len(), 1, "one entry, not three");
        let e = &entries[0];
        assert_eq!(e.original, original);
        assert_eq!(e.corrections, vec![first.clone(), second.clone()]);
        assert_eq!(e.current().unwrap().as_reading().unwrap().measurements.ph, Some(7.4));
        assert_eq!(e.current_id(), second.id);
        assert_eq!(e.supersedes(), Some(first.id));
        assert_eq!(history::entry(store, second.id).unwrap().unwrap(), *e, "found from any id in the chain");

        // The corrected reading stays at its original time in the history.
        let window = TimeRange::new(Some(morning(-1).with_timezone(&Utc)), Some(morning(1).with_timezone(&Utc)));
        assert_eq!(history::entries(store, &[tank("B2-07")], &window).unwrap().len(), 1);

        // Withdrawal: hidden from the current value, kept in the trail.
        let withdraw = correction(&original, 120, None, "wrong tank");
        store.append(std::slice::from_ref(&withdraw)).unwrap();
        let e = history::entry(store, original.id).unwrap().unwrap();
        assert!(e.is_withdrawn());
        assert_eq!(e.trail().count(), 4);
        assert_eq!(e.last_value().as_reading().unwrap().measurements.ph, Some(7.4));
    });
}

#[test]
fn a_correction_that_moves_a_reading_is_found_from_both_tanks() {
    each_store(|store| {
        let original = reading(tank("A1"), 0, 7.0);
        let moved =
            correction(&original, 500, Some(RecordBody::Reading(Reading::new(tank("A2")).with_ph(7.0))), "wrong tank");
        store.append(&[original.clone(), moved.clone()]).unwrap();
        let at_time = TimeRange::new(Some(morning(-5).with_timezone(&Utc)), Some(morning(5).with_timezone(&Utc)));
        for t in ["A1", "A2"] {
            let entries = history::entries(store, &[tank(t)], &at_time).unwrap();
            assert_eq!(entries.len(), 1, "{t}");
            assert_eq!(entries[0].target(), Some(&tank("A2")));
        }
    });
}

#[test]
fn saving_twice_is_harmless_and_conflicts_and_bad_records_store_nothing() {
    each_store(|store| {
        let r = reading(tank("T1"), 0, 7.0);
        assert_eq!(store.append(std::slice::from_ref(&r)).unwrap().added, 1);
        let again = store.append(&[r.clone(), r.clone()]).unwrap();
        assert_eq!((again.added, again.skipped), (0, 2));

        let mut other = r.clone();
        other.operator = "Someone Else".into();
        let fresh = reading(tank("T1"), 1, 7.1);
        match store.append(&[fresh.clone(), other]) {
            Err(StoreError::Conflict { id }) => assert_eq!(id, r.id),
            other => panic!("expected a conflict, got {other:?}"),
        }
        let mut bad = reading(tank("T1"), 2, 7.0);
        if let RecordBody::Reading(reading) = &mut bad.body {
            reading.measurements.ph = Some(15.0);
        }
        match store.append(&[fresh.clone(), bad.clone()]) {
            Err(StoreError::Invalid { id, source }) => {
                assert_eq!(id, bad.id);
                assert_eq!(source.field(), Field::Ph);
            }
            other => panic!("expected an invalid record, got {other:?}"),
        }
        assert_eq!(store.len().unwrap(), 1, "nothing of a refused batch is stored");
        assert!(store.get(fresh.id).unwrap().is_none());
    });
}

fn journal_len(dir: &Path) -> u64 {
    fs::metadata(dir.join(journal::FILE_NAME)).unwrap().len()
}

#[test]
fn journal_lines_the_database_lacks_are_applied_on_open() {
    let dir = tempfile::tempdir().unwrap();
    let kept = reading(tank("T1"), 0, 7.0);
    {
        let mut store = SledStore::open(dir.path()).unwrap();
        store.append(std::slice::from_ref(&kept)).unwrap();
    }
    // As if a save had been cut short after its journal write: two whole
    // lines, then half a line that was never acknowledged.
    let (a, b, c) = (reading(tank("T1"), 1, 7.1), reading(tank("T2"), 2, 7.2), reading(tank("T3"), 3, 7.3));
    let mut tail = Vec::new();
    for r in [&a, &b] {
        tail.extend(journal::record_line(&serde_json::to_vec(r).unwrap()));
    }
    let half = journal::record_line(&serde_json::to_vec(&c).unwrap());
    tail.extend(&half[..half.len() / 2]);
    let before = journal_len(dir.path());
    fs::OpenOptions::new().append(true).open(dir.path().join(journal::FILE_NAME)).unwrap().write_all(&tail).unwrap();

    let store = SledStore::open(dir.path()).unwrap();
    assert_eq!(store.opened().caught_up, 2);
    let aside = store.opened().set_aside.clone().expect("the half line is moved aside");
    assert_eq!(fs::read(&aside).unwrap(), &half[..half.len() / 2]);
    for r in [&kept, &a, &b] {
        assert_eq!(store.get(r.id).unwrap().as_ref(), Some(r));
    }
    assert!(store.get(c.id).unwrap().is_none());
    assert_eq!(store.history(&[tank("T2")], &TimeRange::ALL).unwrap().len(), 1, "indexed too");
    drop(store);
    let whole = before + tail.len() as u64 - (half.len() / 2) as u64;
    assert_eq!(journal_len(dir.path()), whole);
    let report = repair::examine(dir.path()).unwrap();
    assert!(report.agrees(), "{:?}", report.problems());
}

#[test]
fn a_damaged_journal_line_stops_the_open_and_names_the_line() {
    let dir = tempfile::tempdir().unwrap();
    {
        let mut store = SledStore::open(dir.path()).unwrap();
        store.append(&[reading(tank("T1"), 0, 7.0)]).unwrap();
    }
    let path = dir.path().join(journal::FILE_NAME);
    let mut f = fs::OpenOptions::new().append(true).open(&path).unwrap();
    f.write_all(b"{\"id\": \"garbled\n").unwrap();
    f.write_all(&journal::record_line(&serde_json::to_vec(&reading(tank("T1"), 1, 7.0)).unwrap())).unwrap();
    drop(f);
    match SledStore::open(dir.path()) {
        Err(StoreError::Journal { line, .. }) => assert_eq!(line, 3),
        other => panic!("expected a journal error, got {other:?}"),
    }
    let report = repair::examine(dir.path()).unwrap();
    assert!(!report.agrees());
    assert_eq!(report.journal.bad_lines.len(), 1);
    assert_eq!(report.journal.bad_lines[0].number, 3);
    // Rebuild keeps both good records and sets the damaged journal aside.
    let done = repair::rebuild(dir.path()).unwrap();
    assert_eq!(done.records, 2);
    let moved = done.journal_moved_to.expect("the damaged journal is kept");
    assert!(fs::read_to_string(moved).unwrap().contains("garbled"));
    let store = SledStore::open(dir.path()).unwrap();
    assert_eq!(store.len().unwrap(), 2);
    drop(store);
    assert!(repair::examine(dir.path()).unwrap().agrees());
}

#[test]
fn rebuild_after_the_database_is_deleted_or_damaged() {
    for damage in ["delete", "garble", "truncate"] {
        let dir = tempfile::tempdir().unwrap();
        let records = every_kind();
        let device = {
            let mut store = SledStore::open(dir.path()).unwrap();
            for r in &records {
                store.append(std::slice::from_ref(r)).unwrap();
            }
            store.device()
        };
        let db = dir.path().join("store");
        match damage {
            "delete" => fs::remove_dir_all(&db).unwrap(),
            _ => {
                for entry in walk(&db) {
                    let bytes = fs::read(&entry).unwrap();
                    let damaged = if damage == "garble" {
                        bytes.iter().enumerate().map(|(i, b)| if i % 7 == 3 { b ^ 0x5a } else { *b }).collect()
                    } else {
                        bytes[..bytes.len() / 3].to_vec()
                    };
                    fs::write(&entry, damaged).unwrap();
                }
            }
        }
        let report = repair::examine(dir.path()).unwrap();
        if damage == "delete" {
            assert!(!report.database.exists);
        } else {
            assert!(report.database.open_error.is_some(), "{damage}: {:?}", report.problems());
            assert!(done_error_named(&report));
        }
        let done = repair::rebuild(dir.path()).unwrap();
        assert_eq!(done.records, records.len(), "{damage}");
        assert_eq!(done.device, Some(device));
        if damage != "delete" {
            let moved = done.database_moved_to.as_ref().expect("old database kept");
            assert!(moved.exists(), "{damage}");
        }
        let store = SledStore::open(dir.path()).unwrap();
        assert_eq!(store.device(), device);
        for r in &records {
            assert_eq!(store.get(r.id).unwrap().as_ref(), Some(r), "{damage}");
        }
        assert_eq!(history::entries(&store, &[system("RACK-B")], &TimeRange::ALL).unwrap().len(), 13);
        drop(store);
        let report = repair::examine(dir.path()).unwrap();
        assert!(report.agrees(), "{damage}: {:?}", report.problems());
    }
}

fn done_error_named(report: &repair::Report) -> bool {
    report.problems().iter().any(|p| p.starts_with("the database will not open"))
}

fn walk(dir: &Path) -> Vec<std::path::PathBuf> {
    let mut out = Vec::new();
    for entry in fs::read_dir(dir).unwrap() {
        let path = entry.unwrap().path();
        if path.is_dir() {
            out.extend(walk(&path));
        } else {
            out.push(path);
        }
    }
    out
}

#[test]
fn rebuild_keeps_records_only_the_database_had() {
    let dir = tempfile::tempdir().unwrap();
    let records: Vec<Record> = (0..5).map(|i| reading(tank("T1"), i, 7.0)).collect();
    {
        let mut store = SledStore::open(dir.path()).unwrap();
        store.append(&records).unwrap();
    }
    // Lose the journal entirely: the database still has everything.
    let path = dir.path().join(journal::FILE_NAME);
    fs::remove_file(&path).unwrap();
    match SledStore::open(dir.path()) {
        Err(StoreError::Disagree { message }) => assert!(message.contains("journal"), "{message}"),
        other => panic!("expected a disagreement, got {other:?}"),
    }
    let report = repair::examine(dir.path()).unwrap();
    assert_eq!(report.missing_from_journal_count, 5);
    let done = repair::rebuild(dir.path()).unwrap();
    assert_eq!((done.records, done.from_old_database), (5, 5));
    let scan = journal::scan(&path, 0, 1).unwrap();
    assert_eq!(scan.records.len(), 5, "a new journal holds them again");
    let store = SledStore::open(dir.path()).unwrap();
    assert_eq!(store.len().unwrap(), 5);
}

#[test]
fn doctor_sees_a_record_missing_from_either_side() {
    let dir = tempfile::tempdir().unwrap();
    {
        let mut store = SledStore::open(dir.path()).unwrap();
        store.append(&[reading(tank("T1"), 0, 7.0), reading(tank("T1"), 1, 7.0)]).unwrap();
    }
    assert!(repair::examine(dir.path()).unwrap().agrees());
    // Drop the last journal line by hand: the database has one more.
    let path = dir.path().join(journal::FILE_NAME);
    let text = fs::read_to_string(&path).unwrap();
    let mut lines: Vec<&str> = text.lines().collect();
    lines.pop();
    let mut shorter = lines.join("\n");
    shorter.push('\n');
    fs::write(&path, &shorter).unwrap();
    // Append a record line the database never saw, in place of the dropped one.
    let extra = reading(tank("T9"), 5, 7.0);
    let mut f = fs::OpenOptions::new().append(true).open(&path).unwrap();
    f.write_all(&journal::record_line(&serde_json::to_vec(&extra).unwrap())).unwrap();
    drop(f);
    let report = repair::examine(dir.path()).unwrap();
    assert_eq!(report.missing_from_journal_count, 1, "{:?}", report.problems());
    assert_eq!(report.missing_from_database_count + report.pending.len(), 1, "{:?}", report.problems());
    assert!(!report.agrees());
    assert!(report.problems().iter().any(|p| p.contains("missing from the journal")));
    let done = repair::rebuild(dir.path()).unwrap();
    assert_eq!(done.records, 3);
    assert!(repair::examine(dir.path()).unwrap().agrees());
}

#[test]
fn a_second_open_of_the_same_folder_is_refused_clearly() {
    let dir = tempfile::tempdir().unwrap();
    let mut first = SledStore::open(dir.path()).unwrap();
    let err = SledStore::open(dir.path()).unwrap_err();
    assert!(matches!(err, StoreError::InUse { .. }));
    assert!(err.to_string().starts_with("data folder in use by another tankwalk"), "{err}");
    assert!(matches!(repair::examine(dir.path()), Err(StoreError::InUse { .. })));
    assert!(matches!(repair::rebuild(dir.path()), Err(StoreError::InUse { .. })));
    first.append(&[reading(tank("T1"), 0, 7.0)]).unwrap();
    drop(first);
    assert_eq!(SledStore::open(dir.path()).unwrap().len().unwrap(), 1);
}

#[test]
fn a_folder_first_used_with_a_cut_short_header_starts_cleanly() {
    let dir = tempfile::tempdir().unwrap();
    fs::write(dir.path().join(journal::FILE_NAME), b"{\"format\":\"tankwalk-rec").unwrap();
    let mut store = SledStore::open(dir.path()).unwrap();
    assert!(store.opened().set_aside.is_some());
    store.append(&[reading(tank("T1"), 0, 7.0)]).unwrap();
    assert_eq!(store.len().unwrap(), 1);
}

#[test]
fn a_correction_whose_original_is_unknown_is_kept_and_resolves_later() {
    // Sync may bring a correction before the record it corrects.
    let mut store = MemStore::new();
    let original = reading(tank("T1"), 0, 8.0);
    let fix = correction(&original, 600, Some(RecordBody::Reading(Reading::new(tank("T1")).with_ph(7.0))), "typo");
    store.append(std::slice::from_ref(&fix)).unwrap();
    assert!(history::entries(&store, &[tank("T1")], &TimeRange::ALL).unwrap().is_empty());
    store.append(std::slice::from_ref(&original)).unwrap();
    let entries = history::entries(&store, &[tank("T1")], &TimeRange::ALL).unwrap();
    assert_eq!(entries.len(), 1);
    assert_eq!(entries[0].current_id(), fix.id);
}

#[test]
fn a_half_written_sled_snapshot_left_by_a_kill_does_not_stop_the_open() {
    // sled 0.34.7 would read `snap.<lsn>.generating` as the newest snapshot and
    // report corruption (spacejam/sled#1527); tests/crash_safety.rs found it.
    let dir = tempfile::tempdir().unwrap();
    let records: Vec<Record> = (0..20).map(|i| reading(tank("T1"), i, 7.0)).collect();
    {
        let mut store = SledStore::open(dir.path()).unwrap();
        store.append(&records).unwrap();
    }
    let stray = dir.path().join("store").join("snap.FFFFFFFFFFFFFFF0.generating");
    fs::write(&stray, b"half a snapshot, cut short by SIGKILL").unwrap();
    let store = SledStore::open(dir.path()).unwrap();
    assert_eq!(store.len().unwrap(), 20);
    assert!(!stray.exists());
}
