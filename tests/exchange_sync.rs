//! Two and three laptops recording, correcting and syncing through one
//! shared folder in random orders end with the same history, every record
//! once, and the corrections made on one laptop on all of them.

use std::collections::BTreeMap;
use std::fs;
use std::path::Path;

use chrono::{Duration, FixedOffset, TimeZone};
use proptest::prelude::*;
use tankwalk::core::units::AmmoniaBasis;
use tankwalk::exchange::{self, no_progress};
use tankwalk::model::record::*;
use tankwalk::store::{Entry, SledStore, Store, TimeRange, history};
use ulid::Ulid;

/// What one laptop does next.
#[derive(Debug, Clone)]
enum Step {
    /// Takes a reading of tank `tank` with this pH.
    Read { laptop: usize, tank: u8, ph: f64 },
    /// Corrects the `pick`-th entry it knows (if any) to this pH, or withdraws it.
    Correct { laptop: usize, pick: usize, ph: Option<f64> },
    /// Syncs with the shared folder.
    Sync { laptop: usize },
}

fn step(laptops: usize) -> impl Strategy<Value = Step> {
    prop_oneof![
        4 => (0..laptops, 0u8..6, 6.0..8.5f64).prop_map(|(laptop, tank, ph)| Step::Read { laptop, tank, ph }),
        2 => (0..laptops, any::<usize>(), prop::option::weighted(0.8, 6.0..8.5f64))
            .prop_map(|(laptop, pick, ph)| Step::Correct { laptop, pick, ph }),
        3 => (0..laptops).prop_map(|laptop| Step::Sync { laptop }),
    ]
}

struct Laptop {
    store: SledStore,
    operator: String,
}

/// 2026-12-01 06:00 at UTC+01:00 plus `minutes`; each laptop's clock a little off.
fn clock(minutes: i64, laptop: usize) -> chrono::DateTime<FixedOffset> {
    FixedOffset::east_opt(3600).unwrap().with_ymd_and_hms(2026, 12, 1, 6, 0, 0).unwrap()
        + Duration::minutes(minutes)
        + Duration::seconds(laptop as i64 * 7 - 5)
}

fn entries(store: &SledStore) -> Vec<Entry> {
    history::entries(store, &[], &TimeRange::ALL).unwrap()
}

fn all(store: &SledStore) -> BTreeMap<Ulid, Record> {
    store.all().unwrap().map(|r| r.unwrap()).map(|r| (r.id, r)).collect()
}

/// Record lines in every segment of the shared folder.
fn segment_lines(share: &Path) -> usize {
    let mut lines = 0;
    for device in fs::read_dir(share).unwrap() {
        for segment in fs::read_dir(device.unwrap().path()).unwrap() {
            let text = fs::read_to_string(segment.unwrap().path()).unwrap();
            lines += text.lines().count() - 1;
        }
    }
    lines
}

fn run(laptops: usize, steps: &[Step]) {
    let work = tempfile::tempdir().unwrap();
    let share = work.path().join("shared");
    fs::create_dir(&share).unwrap();
    let names = ["Ines Varga", "Tomas Reyes", "Mei Tanaka"];
    let mut fleet: Vec<Laptop> = (0..laptops)
        .map(|i| Laptop {
            store: SledStore::open(&work.path().join(format!("laptop-{i}"))).unwrap(),
            operator: names[i].to_string(),
        })
        .collect();
    let mut made: Vec<Record> = Vec::new();
    for (minute, step) in steps.iter().enumerate() {
        let minute = minute as i64;
        match *step {
            Step::Read { laptop, tank, ph } => {
                let l = &mut fleet[laptop];
                let mut r = Reading::new(Target::Tank(format!("R1-{tank:02}")));
                r.measurements.temperature = Some(Temperature::celsius(25.0));
                r.measurements.ph = Some(ph);
                r.measurements.total_ammonia = Some(TotalAmmonia { value: 0.4, basis: AmmoniaBasis::N });
                let record = Record::new(l.store.device(), &l.operator, clock(minute, laptop), RecordBody::Reading(r));
                l.store.append(std::slice::from_ref(&record)).unwrap();
                made.push(record);
            }
            Step::Correct { laptop, pick, ph } => {
                let l = &mut fleet[laptop];
                let known = entries(&l.store);
                if known.is_empty() {
                    continue;
                }
                let entry = &known[pick % known.len()];
                let replacement = ph.map(|ph| {
                    let mut body = entry.last_value().clone();
                    if let RecordBody::Reading(r) = &mut body {
                        r.measurements.ph = Some(ph);
                    }
                    Box::new(body)
                });
                let correction =
                    Correction { supersedes: entry.current_id(), replacement, reason: "re-read the meter".into() };
                let record = Record::new(
                    l.store.device(),
                    &l.operator,
                    clock(minute, laptop),
                    RecordBody::Correction(correction),
                );
                l.store.append(std::slice::from_ref(&record)).unwrap();
                made.push(record);
            }
            Step::Sync { laptop } => {
                let summary = exchange::sync(&mut fleet[laptop].store, &share, &mut no_progress).unwrap();
                assert!(summary.left.is_empty(), "{summary:?}");
                assert_eq!(summary.conflicts(), 0);
            }
        }
    }
    // Everyone syncs until all have everything: twice round is enough.
    for _ in 0..2 {
        for l in &mut fleet {
            exchange::sync(&mut l.store, &share, &mut no_progress).unwrap();
        }
    }
    let expected: BTreeMap<Ulid, Record> = made.iter().map(|r| (r.id, r.clone())).collect();
    assert_eq!(expected.len(), made.len());
    let first_entries = entries(&fleet[0].store);
    for (i, l) in fleet.iter().enumerate() {
        assert_eq!(all(&l.store), expected, "laptop {i} holds every record once, and nothing else");
        assert_eq!(entries(&l.store), first_entries, "laptop {i} sees the same history");
    }
    // Every correction made anywhere decides the current value everywhere.
    for c in made.iter().filter(|r| r.body.as_correction().is_some()) {
        for l in &fleet {
            let entry = history::entry(&l.store, c.id).unwrap().unwrap();
            assert!(entry.corrections.iter().any(|r| r.id == c.id));
        }
    }
    assert_eq!(segment_lines(&share), made.len(), "each record crossed the shared folder once");
}

proptest! {
    #![proptest_config(ProptestConfig { cases: 16, ..ProptestConfig::default() })]

    #[test]
    fn two_laptops_end_with_one_history(steps in prop::collection::vec(step(2), 5..30)) {
        run(2, &steps);
    }

    #[test]
    fn three_laptops_end_with_one_history(steps in prop::collection::vec(step(3), 5..40)) {
        run(3, &steps);
    }
}

#[test]
fn a_correction_on_one_laptop_reaches_the_others() {
    let steps = [
        Step::Read { laptop: 0, tank: 1, ph: 7.9 },
        Step::Sync { laptop: 0 },
        Step::Sync { laptop: 1 },
        Step::Correct { laptop: 1, pick: 0, ph: Some(7.4) },
        Step::Sync { laptop: 1 },
        Step::Sync { laptop: 2 },
        Step::Correct { laptop: 2, pick: 0, ph: None },
        Step::Sync { laptop: 0 },
    ];
    run(3, &steps);
}
