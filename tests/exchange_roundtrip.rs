//! Export, import into a fresh store, export again: the same files.
//!
//! Random histories of every record kind (readings with every measurement
//! and unit, events of every kind, skips, corrections and withdrawals, notes
//! starting with formula characters, any offset and sub-second time) go
//! through the lossless JSON Lines and come back identical, byte for byte,
//! and so does the CSV made from them.

#[path = "support/records.rs"]
mod records;

use std::fs;
use std::path::Path;

use proptest::prelude::*;
use tankwalk::exchange::{self, ConflictLog, ExportOptions, Formats, no_progress};
use tankwalk::model::record::Record;
use tankwalk::store::journal::Header;
use tankwalk::store::{MemStore, SledStore, Store};

/// The lines of a file after its header, and the header.
fn split(path: &Path) -> (Header, Vec<u8>) {
    let bytes = fs::read(path).unwrap();
    let end = bytes.iter().position(|b| *b == b'\n').unwrap() + 1;
    (Header::parse(&bytes[..end - 1]).unwrap(), bytes[end..].to_vec())
}

fn all(store: &dyn Store) -> Vec<Record> {
    store.all().unwrap().map(Result::unwrap).collect()
}

/// Exports `first`, imports into `second`, exports `second`; checks the files agree.
fn round_trip(first: &mut dyn Store, second: &mut dyn Store, work: &Path) {
    let options = ExportOptions { formats: Formats::Both, ..ExportOptions::default() };
    let (a, b) = (work.join("a"), work.join("b"));
    let exported = exchange::export(first, &a, &options, &mut no_progress).unwrap();
    let log = ConflictLog::in_data_dir(work, second.device());
    let imported = exchange::import(second, &log, &[a.join(exchange::export::RECORDS_FILE)], &mut no_progress).unwrap();
    let applied = imported.files[0].result.as_ref().unwrap();
    assert_eq!(applied.added as u64, exported.records);
    assert!(applied.conflicts.is_empty());
    exchange::export(second, &b, &options, &mut no_progress).unwrap();

    assert_eq!(all(first), all(second), "the stores hold the same records");
    let (ha, body_a) = split(&a.join(exchange::export::RECORDS_FILE));
    let (hb, body_b) = split(&b.join(exchange::export::RECORDS_FILE));
    assert!(body_a == body_b, "the record lines differ");
    assert_eq!((ha.device, hb.device), (first.device(), second.device()), "each header names its exporter");
    let csv_a = fs::read(a.join(exchange::export::READINGS_FILE)).unwrap();
    let csv_b = fs::read(b.join(exchange::export::READINGS_FILE)).unwrap();
    assert!(csv_a == csv_b, "the CSV files differ");
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 48, ..ProptestConfig::default() })]

    #[test]
    fn export_import_export_gives_the_same_files(history in records::history(1..40)) {
        let work = tempfile::tempdir().unwrap();
        let mut first = MemStore::new();
        first.append(&history).unwrap();
        let mut second = MemStore::new();
        round_trip(&mut first, &mut second, work.path());
    }
}

#[test]
fn the_same_through_the_durable_store() {
    use proptest::strategy::ValueTree;
    let mut runner = proptest::test_runner::TestRunner::deterministic();
    let history = records::history(100..140).new_tree(&mut runner).unwrap().current();
    let kinds: std::collections::HashSet<&str> = history.iter().map(|r| r.body.kind_name()).collect();
    assert!(history.len() > 60 && kinds.len() == 4, "a varied history: {} records, {kinds:?}", history.len());
    let work = tempfile::tempdir().unwrap();
    let mut first = SledStore::open(&work.path().join("first")).unwrap();
    first.append(&history).unwrap();
    let mut second = SledStore::open(&work.path().join("second")).unwrap();
    round_trip(&mut first, &mut second, work.path());
    // And importing the same file again changes nothing.
    let log = ConflictLog::in_data_dir(work.path(), second.device());
    let file = work.path().join("a").join(exchange::export::RECORDS_FILE);
    let again = exchange::import(&mut second, &log, &[file], &mut no_progress).unwrap();
    assert_eq!(again.added(), 0);
    assert_eq!(second.len().unwrap(), first.len().unwrap());
}

#[test]
fn since_keeps_the_records_taken_from_then_and_the_corrections_of_them() {
    use chrono::{Duration, TimeZone, Utc};
    use tankwalk::model::record::*;
    let day = |d: i64| Utc.with_ymd_and_hms(2026, 11, 1, 8, 0, 0).unwrap().fixed_offset() + Duration::days(d);
    let device = DeviceId::generate();
    let reading = |d: i64, ph: f64| {
        let mut r = Reading::new(Target::Tank("T1".into()));
        r.measurements.ph = Some(ph);
        Record::new(device, "Ana Sousa", day(d), RecordBody::Reading(r))
    };
    let (old, new) = (reading(0, 7.0), reading(10, 7.2));
    // Made on day 12, about the reading of day 0: it belongs with day 0.
    let fix_old = Record::new(
        device,
        "Ana Sousa",
        day(12),
        RecordBody::Correction(Correction { supersedes: old.id, replacement: None, reason: "wrong tank".into() }),
    );
    let mut store = MemStore::new();
    store.append(&[old, new.clone(), fix_old]).unwrap();
    let work = tempfile::tempdir().unwrap();
    let since = Some(day(5).with_timezone(&Utc));
    let options = ExportOptions { since, ..ExportOptions::default() };
    let summary = exchange::export(&store, work.path(), &options, &mut no_progress).unwrap();
    assert_eq!(summary.records, 1);
    assert_eq!(summary.rows, 1);
    let (header, body) = split(&work.path().join(exchange::export::RECORDS_FILE));
    assert_eq!(header.since, since);
    assert_eq!(body, [serde_json::to_vec(&new).unwrap(), b"\n".to_vec()].concat());
}
