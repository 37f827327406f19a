//! Latency of a durable save: one reading appended to the journal (fsynced)
//! and applied to sled (flushed), beside the physical floor measured in the
//! same run on the same disk (one small write plus `fdatasync`) and beside the
//! common alternative: the same save with SQLite (WAL, `synchronous=FULL`).
//!
//! Criterion measures each operation on its own. The percentiles come from a
//! second phase that runs the three operations in turn (save, floor, SQLite,
//! save, ...), so that all three meet the same disk at the same moments: on a
//! shared machine the disk's own slow spells would otherwise land on one of
//! them and not the others. Every single operation of that phase is timed.
//!
//! `cargo bench --bench store` (data in a temporary folder under `TMPDIR`:
//! point it at the disk you care about); `TANKWALK_BENCH_QUICK=1` for a short
//! run while developing.

use std::fs::{File, OpenOptions};
use std::hint::black_box;
use std::io::{Seek, SeekFrom, Write};
use std::time::{Duration, Instant};

use chrono::Utc;
use criterion::{Criterion, criterion_group, criterion_main};
use rusqlite::Connection;
use tankwalk::core::units::AmmoniaBasis;
use tankwalk::model::record::{Reading, Record, RecordBody, Target, Temperature, TotalAmmonia};
use tankwalk::store::{SledStore, Store};

#[path = "support/sqlite_peer.rs"]
#[allow(dead_code)] // its queries serve the limits bench
mod sqlite_peer;

fn quick() -> bool {
    std::env::var_os("TANKWALK_BENCH_QUICK").is_some()
}

fn reading(store: &SledStore, i: u64) -> Record {
    let mut r = Reading::new(Target::Tank(format!("B{}-{:02}", i % 4 + 1, i % 12 + 1)));
    r.measurements.temperature = Some(Temperature::celsius(25.0 + (i % 20) as f64 / 10.0));
    r.measurements.ph = Some(7.2 + (i % 10) as f64 / 20.0);
    r.measurements.total_ammonia = Some(TotalAmmonia { value: 0.25, basis: AmmoniaBasis::N });
    Record::new(store.device(), "Bench Operator", Utc::now().fixed_offset(), RecordBody::Reading(r))
}

/// The three ways of making one reading durable, on one disk.
struct Savers {
    store: SledStore,
    sqlite: Connection,
    floor: File,
    line: Vec<u8>,
    i: u64,
    _dir: tempfile::TempDir,
}

impl Savers {
    /// A store and a SQLite database that already hold a morning's worth of rounds (2,000 readings).
    fn new() -> Savers {
        let dir = tempfile::tempdir().unwrap();
        let mut store = SledStore::open(dir.path()).unwrap();
        let history: Vec<Record> = (0..2_000).map(|i| reading(&store, i)).collect();
        store.append(&history).unwrap();
        let mut sqlite = sqlite_peer::open(&dir.path().join("peer.sqlite"));
        sqlite_peer::save(&mut sqlite, &history);
        let line = serde_json::to_vec(&reading(&store, 0)).unwrap();
        let floor = OpenOptions::new().create(true).truncate(true).write(true).open(dir.path().join("floor")).unwrap();
        Savers { store, sqlite, floor, line, i: 10_000, _dir: dir }
    }

    fn save(&mut self) -> Duration {
        self.i += 1;
        let record = reading(&self.store, self.i);
        let started = Instant::now();
        self.store.append(black_box(std::slice::from_ref(&record))).unwrap();
        started.elapsed()
    }

    /// The same number of bytes written and synced to a file on the same disk.
    fn floor(&mut self) -> Duration {
        let started = Instant::now();
        self.floor.write_all(black_box(&self.line)).unwrap();
        self.floor.sync_data().unwrap();
        let took = started.elapsed();
        if self.floor.stream_position().unwrap() > 1 << 24 {
            self.floor.set_len(0).unwrap();
            self.floor.seek(SeekFrom::Start(0)).unwrap();
        }
        took
    }

    fn sqlite(&mut self) -> Duration {
        self.i += 1;
        let record = reading(&self.store, self.i);
        let started = Instant::now();
        sqlite_peer::save(&mut self.sqlite, black_box(std::slice::from_ref(&record)));
        started.elapsed()
    }
}

fn timed(iters: u64, mut op: impl FnMut() -> Duration) -> Duration {
    (0..iters).map(|_| op()).sum()
}

fn durable_save(c: &mut Criterion) {
    let mut savers = Savers::new();
    let mut group = c.benchmark_group("store");
    group.sample_size(60).measurement_time(Duration::from_secs(if quick() { 2 } else { 20 }));
    group.bench_function("save one reading (journal fsync + sled flush)", |b| {
        b.iter_custom(|iters| timed(iters, || savers.save()))
    });
    group.bench_function("write one line + fdatasync (floor)", |b| {
        b.iter_custom(|iters| timed(iters, || savers.floor()))
    });
    group.bench_function("save one reading, SQLite (WAL, synchronous=FULL)", |b| {
        b.iter_custom(|iters| timed(iters, || savers.sqlite()))
    });
    group.finish();

    // Side by side: the three in turn, every operation timed.
    let rounds = if quick() { 300 } else { 5_000 };
    let mut timings: [Vec<Duration>; 3] = Default::default();
    for round in 0..rounds {
        // Rotate who goes first, so none always follows the same neighbour.
        for k in 0..3 {
            match (round + k) % 3 {
                0 => timings[0].push(savers.save()),
                1 => timings[1].push(savers.floor()),
                _ => timings[2].push(savers.sqlite()),
            }
        }
    }
    let names = ["save (tankwalk)", "fsync floor", "SQLite FULL"];
    println!("\nsingle-operation latency, the three in turn, {rounds} rounds:");
    println!("{:<16} {:>10} {:>10} {:>10} {:>10}", "", "median", "p90", "p99", "max");
    let mut quantiles = Vec::new();
    for (name, t) in names.iter().zip(timings.iter_mut()) {
        t.sort();
        let at = |q: f64| t[((t.len() - 1) as f64 * q).round() as usize];
        println!("{name:<16} {:>10.3?} {:>10.3?} {:>10.3?} {:>10.3?}", at(0.5), at(0.9), at(0.99), t[t.len() - 1]);
        quantiles.push([at(0.5), at(0.9), at(0.99)]);
    }
    let ratio = |a: usize, b: usize| -> Vec<String> {
        (0..3).map(|q| format!("{:.2}", quantiles[a][q].as_secs_f64() / quantiles[b][q].as_secs_f64())).collect()
    };
    println!("ratio save / fsync floor   (median, p90, p99): {}", ratio(0, 1).join(", "));
    println!("ratio save / SQLite        (median, p90, p99): {}", ratio(0, 2).join(", "));
    println!("ratio SQLite / fsync floor (median, p90, p99): {}", ratio(2, 1).join(", "));
}

criterion_group!(benches, durable_save);
criterion_main!(benches);
