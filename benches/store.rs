//! Latency of a durable save: one reading appended to the journal (fsynced)
//! and applied to sled (flushed), beside the physical floor measured in the
//! same run on the same disk: one small write plus `fdatasync`.
//!
//! Criterion reports the mean of each sample; every single save is also
//! timed, and the median, p90 and p99 of those are printed at the end.
//!
//! `cargo bench --bench store` (data in a temporary folder under `TMPDIR`:
//! point it at the disk you care about).

use std::fs::OpenOptions;
use std::hint::black_box;
use std::io::{Seek, SeekFrom, Write};
use std::sync::Mutex;
use std::time::{Duration, Instant};

use chrono::Utc;
use criterion::{Criterion, criterion_group, criterion_main};
use tankwalk::core::units::AmmoniaBasis;
use tankwalk::model::record::{Reading, Record, RecordBody, Target, Temperature, TotalAmmonia};
use tankwalk::store::{SledStore, Store};

/// Every single timing, per benchmark, for the percentiles.
static TIMINGS: Mutex<Vec<(&'static str, Vec<Duration>)>> = Mutex::new(Vec::new());

fn note(name: &'static str, d: Duration) {
    let mut all = TIMINGS.lock().unwrap();
    match all.iter_mut().find(|(n, _)| *n == name) {
        Some((_, v)) => v.push(d),
        None => all.push((name, vec![d])),
    }
}

fn reading(store: &SledStore, i: u64) -> Record {
    let mut r = Reading::new(Target::Tank(format!("B{}-{:02}", i % 4 + 1, i % 12 + 1)));
    r.measurements.temperature = Some(Temperature::celsius(25.0 + (i % 20) as f64 / 10.0));
    r.measurements.ph = Some(7.2 + (i % 10) as f64 / 20.0);
    r.measurements.total_ammonia = Some(TotalAmmonia { value: 0.25, basis: AmmoniaBasis::N });
    Record::new(store.device(), "Bench Operator", Utc::now().fixed_offset(), RecordBody::Reading(r))
}

fn durable_save(c: &mut Criterion) {
    let dir = tempfile::tempdir().unwrap();
    let mut store = SledStore::open(dir.path()).unwrap();
    // A store that already holds a morning's worth of rounds.
    let history: Vec<Record> = (0..2_000).map(|i| reading(&store, i)).collect();
    store.append(&history).unwrap();

    let mut group = c.benchmark_group("store");
    group.sample_size(60).measurement_time(Duration::from_secs(20));
    let mut i = 10_000;
    group.bench_function("save one reading (journal fsync + sled flush)", |b| {
        b.iter_custom(|iters| {
            let mut total = Duration::ZERO;
            for _ in 0..iters {
                i += 1;
                let record = reading(&store, i);
                let started = Instant::now();
                store.append(black_box(std::slice::from_ref(&record))).unwrap();
                let took = started.elapsed();
                note("save", took);
                total += took;
            }
            total
        })
    });

    // The floor: the same number of bytes written and synced to a file on the same disk.
    let line = serde_json::to_vec(&reading(&store, 0)).unwrap();
    let mut file = OpenOptions::new().create(true).truncate(true).write(true).open(dir.path().join("floor")).unwrap();
    group.bench_function("write one line + fdatasync (floor)", |b| {
        b.iter_custom(|iters| {
            let mut total = Duration::ZERO;
            for _ in 0..iters {
                let started = Instant::now();
                file.write_all(black_box(&line)).unwrap();
                file.sync_data().unwrap();
                let took = started.elapsed();
                note("fsync", took);
                total += took;
                if file.stream_position().unwrap() > 1 << 24 {
                    file.set_len(0).unwrap();
                    file.seek(SeekFrom::Start(0)).unwrap();
                }
            }
            total
        })
    });
    group.finish();
    drop(store);

    let all = TIMINGS.lock().unwrap();
    println!("\nsingle-operation latency over every timed operation:");
    println!("{:<8} {:>8} {:>10} {:>10} {:>10} {:>10}", "", "n", "median", "p90", "p99", "max");
    for (name, timings) in all.iter() {
        let mut t = timings.clone();
        t.sort();
        let at = |q: f64| t[((t.len() - 1) as f64 * q).round() as usize];
        println!(
            "{name:<8} {:>8} {:>10.3?} {:>10.3?} {:>10.3?} {:>10.3?}",
            t.len(),
            at(0.5),
            at(0.9),
            at(0.99),
            t[t.len() - 1]
        );
    }
}

criterion_group!(benches, durable_save);
criterion_main!(benches);
