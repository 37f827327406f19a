//! Against the limits: how the store and the screen behave as the history
//! grows from one reading to a million, each figure beside its peer (the same
//! work done with SQLite, WAL, `synchronous=FULL`) or its floor (the same
//! work without any storage), measured side by side in one run.
//!
//! For stores of 1, 10,000, 100,000 and 1,000,000 readings on a generated
//! room of 1,000 tanks (40 racks of 20 and 200 tubs, 240 waters a day):
//!
//! - open: `SledStore::open` (journal header, sled, catch-up check);
//! - first frame: open, load the last 90 days, build the screen's state and
//!   draw the board at 160x48: what `tankwalk` does before a person sees anything;
//! - history of one tank over 90 days (the tank and its rack's shared water);
//! - a frame of the board and of the walk once started;
//! - export (JSON Lines) beside a plain write of the same bytes, import into a
//!   fresh store and re-import, beside SQLite importing the same file; with
//!   each step's peak memory. These run once per size after the criterion
//!   groups (a million records are too many for criterion's repetitions).
//!
//! The stores are built once and kept under `<target>/bench-stores/` (the
//! 1,000,000-reading one takes a few minutes to build; delete the folder to
//! build them again). Every timed operation is noted; the summary printed at
//! the end (medians, ratios, growth) is what BENCHMARKS.md shows.
//!
//! `cargo bench --bench limits`; `TANKWALK_BENCH_MAX=100000` stops at that
//! size, `TANKWALK_BENCH_QUICK=1` measures briefly (both for development).
//! The page cache is warm: these are the figures of a laptop that opened the
//! store before, not of the first open after a reboot.

#[path = "support/plain_write.rs"]
mod plain;
use plain::plain_write;
use std::collections::BTreeMap;
use std::hint::black_box;
use std::path::PathBuf;
use std::sync::Mutex;
use std::time::{Duration, Instant};

use chrono::{DateTime, FixedOffset, TimeZone};
use criterion::{Criterion, criterion_group, criterion_main};
use ratatui::Terminal;
use ratatui::backend::TestBackend;
use ratatui::widgets::{Paragraph, Wrap};
use tankwalk::model::facility::Facility;
use tankwalk::model::record::{DeviceId, Record, Target};
use tankwalk::store::{SledStore, Store, TimeRange};
use tankwalk::tui::keymap::{Key, Keymap};
use tankwalk::tui::run::{LOADED_DAYS, records_to_show};
use tankwalk::tui::state::{App, Input, SessionInfo, update};
use tankwalk::tui::view;
use ulid::Ulid;

#[path = "support/sqlite_peer.rs"]
mod sqlite_peer;

const SIZES: [usize; 4] = [1, 10_000, 100_000, 1_000_000];
/// Waters read a day in the generated room: 40 racks and 200 tubs.
const WATERS_A_DAY: usize = 240;
/// The tank whose history is read, and its rack.
const TANK: &str = "S07-03";
const RACK: &str = "SYS-07";

fn quick() -> bool {
    std::env::var_os("TANKWALK_BENCH_QUICK").is_some()
}

fn sizes() -> Vec<usize> {
    let max = std::env::var("TANKWALK_BENCH_MAX").ok().and_then(|v| v.parse().ok()).unwrap_or(usize::MAX);
    SIZES.into_iter().filter(|n| *n <= max).collect()
}

fn now() -> DateTime<FixedOffset> {
    FixedOffset::east_opt(3600).unwrap().with_ymd_and_hms(2026, 12, 1, 7, 40, 0).unwrap()
}

fn room() -> Facility {
    tankwalk::demo::generated_room(40, 200)
}

fn session() -> SessionInfo {
    SessionInfo { operator: "Bench".into(), device: DeviceId(Ulid::from_parts(1, 1)), id_seed: 1 }
}

// ---------------------------------------------------------------------------
// Every timed operation, for the summary.

static TIMINGS: Mutex<BTreeMap<(&'static str, usize), Vec<Duration>>> = Mutex::new(BTreeMap::new());

fn note(what: &'static str, size: usize, took: Duration) -> Duration {
    TIMINGS.lock().unwrap().entry((what, size)).or_default().push(took);
    took
}

fn median(what: &str, size: usize) -> Option<Duration> {
    let all = TIMINGS.lock().unwrap();
    let mut t = all.iter().find(|((w, s), _)| *w == what && *s == size)?.1.clone();
    t.sort();
    Some(t[t.len() / 2])
}

// ---------------------------------------------------------------------------
// The stores, built once.

struct Prepared {
    /// The size asked for (readings).
    size: usize,
    dir: PathBuf,
    sqlite: PathBuf,
    readings: usize,
    records: usize,
}

fn bench_stores() -> PathBuf {
    let target = std::env::var_os("CARGO_TARGET_DIR").map_or_else(|| PathBuf::from("target"), PathBuf::from);
    target.join("bench-stores").join(format!(
        "schema{}-journal{}",
        tankwalk::store::SCHEMA_VERSION,
        tankwalk::store::journal::VERSION
    ))
}

/// The first records of a generated history holding `n` readings.
fn generated(n: usize) -> Vec<Record> {
    let days = (n.div_ceil(WATERS_A_DAY) + 1) as u32;
    let history = tankwalk::demo::history(&room(), DeviceId(Ulid::from_parts(1, 1)), now(), days, 2026);
    // Keep the newest records: the history ends today whatever its length.
    let mut readings = 0;
    let mut kept: Vec<Record> = history
        .into_iter()
        .rev()
        .take_while(|r| {
            if r.body.as_reading().is_some() {
                readings += 1;
            }
            readings <= n
        })
        .collect();
    kept.reverse();
    kept
}

fn prepare(n: usize) -> Prepared {
    let root = bench_stores().join(n.to_string());
    let (dir, sqlite, done) = (root.join("data"), root.join("peer.sqlite"), root.join("done"));
    if let Some((readings, records)) = std::fs::read_to_string(&done).ok().and_then(|t| {
        let (a, b) = t.trim().split_once(' ')?;
        Some((a.parse().ok()?, b.parse().ok()?))
    }) {
        return Prepared { size: n, dir, sqlite, readings, records };
    }
    let _ = std::fs::remove_dir_all(&root);
    std::fs::create_dir_all(&root).unwrap();
    let started = Instant::now();
    let records = generated(n);
    let readings = records.iter().filter(|r| r.body.as_reading().is_some()).count();
    let mut store = SledStore::open(&dir).unwrap();
    for chunk in records.chunks(5_000) {
        store.append(chunk).unwrap();
    }
    drop(store);
    let mut conn = sqlite_peer::open(&sqlite);
    for chunk in records.chunks(50_000) {
        sqlite_peer::save(&mut conn, chunk);
    }
    drop(conn);
    std::fs::write(&done, format!("{readings} {}\n", records.len())).unwrap();
    eprintln!("built the store of {readings} readings ({} records) in {:.1?}", records.len(), started.elapsed());
    Prepared { size: n, dir, sqlite, readings, records: records.len() }
}

/// Waits for sled's threads of a dropped database to let go of its files, so
/// that the next open does not wait for its lock inside the timing.
fn settle() {
    std::thread::sleep(Duration::from_millis(60));
}

fn first_frame(app: &App, keymap: &Keymap) {
    let mut terminal = Terminal::new(TestBackend::new(160, 48)).expect("test backend");
    terminal.draw(|f| view::render(app, keymap, f)).expect("a frame");
}

fn app_from(records: Vec<Record>, facility: &Facility) -> App {
    let mut app = App::new(facility.clone(), records, session(), now());
    app.colour = false;
    app
}

fn since_ms() -> i64 {
    (now() - chrono::Duration::days(LOADED_DAYS)).timestamp_millis()
}

// ---------------------------------------------------------------------------

fn against_the_limits(c: &mut Criterion) {
    let keymap = Keymap::default_map();
    let facility = room();
    let targets = [Target::Tank(TANK.into()), Target::System(RACK.into())];
    let sqlite_targets = [format!("T:{TANK}"), format!("S:{RACK}")];
    let range = TimeRange::new(Some((now() - chrono::Duration::days(LOADED_DAYS)).to_utc()), None);
    let mut prepared = Vec::new();
    for n in sizes() {
        let p = prepare(n);
        let name = |what: &str| format!("{what}, {} readings", p.readings);
        let mut group = c.benchmark_group(format!("limits-{n}"));
        group.sample_size(10).warm_up_time(Duration::from_millis(500));
        group.measurement_time(Duration::from_secs(if quick() { 2 } else { 6 }));

        group.bench_function(name("open the store"), |b| {
            b.iter_custom(|iters| {
                let mut total = Duration::ZERO;
                for _ in 0..iters {
                    let started = Instant::now();
                    let store = SledStore::open(&p.dir).unwrap();
                    total += note("open", n, started.elapsed());
                    drop(black_box(store));
                    settle();
                }
                total
            })
        });
        // The floor of opening: sled alone opening the same database with the
        // same settings (no lock, no journal, no check of the two against each other).
        group.bench_function(name("open, sled alone (floor)"), |b| {
            b.iter_custom(|iters| {
                let mut total = Duration::ZERO;
                for _ in 0..iters {
                    let started = Instant::now();
                    let db = sled::Config::new()
                        .path(p.dir.join(tankwalk::store::sled_store::DB_DIR))
                        .flush_every_ms(None)
                        .cache_capacity(64 * 1024 * 1024)
                        .open()
                        .unwrap();
                    for tree in ["records", "by_target", "by_time", "corrections", "meta"] {
                        black_box(db.open_tree(tree).unwrap());
                    }
                    total += note("open sled", n, started.elapsed());
                    drop(db);
                    settle();
                }
                total
            })
        });
        group.bench_function(name("open, SQLite"), |b| {
            b.iter_custom(|iters| {
                let mut total = Duration::ZERO;
                for _ in 0..iters {
                    let started = Instant::now();
                    let conn = sqlite_peer::open(&p.sqlite);
                    let _: i64 = conn.query_row("PRAGMA schema_version", [], |r| r.get(0)).unwrap();
                    total += note("open sqlite", n, started.elapsed());
                }
                total
            })
        });
        group.bench_function(name("start to first frame"), |b| {
            b.iter_custom(|iters| {
                let mut total = Duration::ZERO;
                for _ in 0..iters {
                    let started = Instant::now();
                    let store = SledStore::open(&p.dir).unwrap();
                    let records = records_to_show(&store, now()).unwrap();
                    first_frame(&app_from(records, &facility), &keymap);
                    total += note("first frame", n, started.elapsed());
                    drop(store);
                    settle();
                }
                total
            })
        });
        group.bench_function(name("start to first frame, SQLite"), |b| {
            b.iter_custom(|iters| {
                let mut total = Duration::ZERO;
                for _ in 0..iters {
                    let started = Instant::now();
                    let conn = sqlite_peer::open(&p.sqlite);
                    let mut records = sqlite_peer::history(&conn, &[], since_ms());
                    records.reverse();
                    first_frame(&app_from(records, &facility), &keymap);
                    total += note("first frame sqlite", n, started.elapsed());
                }
                total
            })
        });
        // The floor: the same records already in memory.
        let shown = {
            let store = SledStore::open(&p.dir).unwrap();
            let shown = records_to_show(&store, now()).unwrap();
            drop(store);
            settle();
            shown
        };
        group.bench_function(name("first frame from memory (floor)"), |b| {
            b.iter_custom(|iters| {
                let mut total = Duration::ZERO;
                for _ in 0..iters {
                    let records = shown.clone();
                    let started = Instant::now();
                    first_frame(&app_from(records, &facility), &keymap);
                    total += note("first frame floor", n, started.elapsed());
                }
                total
            })
        });

        let store = SledStore::open(&p.dir).unwrap();
        group.bench_function(name("history of one tank, 90 days"), |b| {
            b.iter_custom(|iters| {
                (0..iters)
                    .map(|_| {
                        let started = Instant::now();
                        black_box(store.history(&targets, &range).unwrap());
                        note("history", n, started.elapsed())
                    })
                    .sum()
            })
        });
        drop(store);
        settle();
        let conn = sqlite_peer::open(&p.sqlite);
        group.bench_function(name("history of one tank, 90 days, SQLite"), |b| {
            b.iter_custom(|iters| {
                (0..iters)
                    .map(|_| {
                        let started = Instant::now();
                        black_box(sqlite_peer::history(&conn, &sqlite_targets, since_ms()));
                        note("history sqlite", n, started.elapsed())
                    })
                    .sum()
            })
        });
        drop(conn);

        // Frames once started: the board of 1,000 tanks and the walk, beside a
        // full screen of plain text through the same backend (the floor of any frame).
        let board = app_from(shown.clone(), &facility);
        let mut walk = board.clone();
        for k in "w 2 5 . 5 enter 7 . 6 enter 0 . 4".split(' ') {
            update(&mut walk, &keymap, Input::Key(k.parse::<Key>().expect("a key")), now());
        }
        let text = "0123456789 abcdefghij ".repeat(160 * 48 / 22 + 1);
        let mut terminal = Terminal::new(TestBackend::new(160, 48)).expect("test backend");
        for (what, app) in [("board frame", &board), ("walk frame", &walk)] {
            group.bench_function(name(what), |b| {
                b.iter_custom(|iters| {
                    (0..iters)
                        .map(|_| {
                            let started = Instant::now();
                            terminal.draw(|f| view::render(black_box(app), &keymap, f)).unwrap();
                            note(what, n, started.elapsed())
                        })
                        .sum()
                })
            });
        }
        group.bench_function(name("frame of plain text (floor)"), |b| {
            b.iter_custom(|iters| {
                (0..iters)
                    .map(|_| {
                        let started = Instant::now();
                        terminal
                            .draw(|f| {
                                f.render_widget(
                                    Paragraph::new(black_box(text.as_str())).wrap(Wrap { trim: false }),
                                    f.area(),
                                )
                            })
                            .unwrap();
                        note("text frame", n, started.elapsed())
                    })
                    .sum()
            })
        });
        group.finish();
        prepared.push(p);
    }
    for p in &prepared {
        eprintln!("store of {} readings: {} records in all", p.readings, p.records);
    }
    let exchanged: Vec<Exchanged> = prepared.iter().filter(|p| p.size >= 10_000).map(exchange_once).collect();
    summary(&prepared);
    exchange_summary(&exchanged);
}

// ---------------------------------------------------------------------------
// Export and import, once per size.

/// Resets the peak resident memory (Linux), so the next peak is the next step's own.
fn reset_peak() {
    let _ = std::fs::write("/proc/self/clear_refs", "5");
}

/// `VmHWM` or `VmRSS` of this process, MiB.
fn memory_mib(key: &str) -> f64 {
    let status = std::fs::read_to_string("/proc/self/status").unwrap_or_default();
    let kib: f64 = status
        .lines()
        .find(|l| l.starts_with(key))
        .and_then(|l| l.split_whitespace().nth(1))
        .and_then(|v| v.parse().ok())
        .unwrap_or(f64::NAN);
    kib / 1024.0
}

/// Runs `step`, returning its time and its peak memory over the resident memory before it (MiB).
fn measured<T>(step: impl FnOnce() -> T) -> (T, Duration, f64) {
    reset_peak();
    let before = memory_mib("VmRSS");
    let started = Instant::now();
    let out = step();
    let took = started.elapsed();
    (out, took, memory_mib("VmHWM") - before)
}

/// SQLite importing the same file: each line read, parsed and checked, saved
/// in transactions of 5,000 (the batch tankwalk's import saves at once).
fn sqlite_import(file: &std::path::Path, db: &std::path::Path) -> usize {
    use std::io::BufRead;
    let mut conn = sqlite_peer::open(db);
    let reader = std::io::BufReader::with_capacity(1 << 16, std::fs::File::open(file).unwrap());
    let mut batch: Vec<Record> = Vec::with_capacity(5_000);
    let mut saved = 0;
    for line in reader.split(b'\n').skip(1) {
        let line = line.unwrap();
        batch.push(tankwalk::store::journal::parse_record(&line).expect("a record"));
        if batch.len() == 5_000 {
            sqlite_peer::save(&mut conn, &batch);
            saved += batch.len();
            batch.clear();
        }
    }
    sqlite_peer::save(&mut conn, &batch);
    saved + batch.len()
}

struct Exchanged {
    readings: usize,
    records: usize,
    bytes: u64,
    export: (Duration, f64),
    plain: Duration,
    import: (Duration, f64),
    reimport: (Duration, f64),
    sqlite: (Duration, f64),
}

fn exchange_once(p: &Prepared) -> Exchanged {
    use tankwalk::exchange::{self, ConflictLog, ExportOptions, Formats, no_progress};
    // On the same disk as the stores.
    let work = tempfile::tempdir_in(bench_stores()).unwrap();
    let out = work.path().join("export");
    let store = SledStore::open(&p.dir).unwrap();
    let options = ExportOptions { formats: Formats::Jsonl, ..ExportOptions::default() };
    let (summary, took, peak) = measured(|| exchange::export(&store, &out, &options, &mut no_progress).unwrap());
    drop(store);
    settle();
    let file = out.join(exchange::export::RECORDS_FILE);
    let bytes = std::fs::metadata(&file).unwrap().len();
    let plain = plain_write(&work.path().join("plain"), bytes);
    let export = (took, peak);
    let records = summary.records as usize;

    let fresh = work.path().join("fresh");
    let mut store = SledStore::open(&fresh).unwrap();
    let log = ConflictLog::in_data_dir(&fresh, store.device());
    let files = [file.clone()];
    let (first, took, peak) = measured(|| exchange::import(&mut store, &log, &files, &mut no_progress).unwrap());
    assert_eq!(first.added(), records, "the import adds every record");
    let import = (took, peak);
    let (again, took, peak) = measured(|| exchange::import(&mut store, &log, &files, &mut no_progress).unwrap());
    assert_eq!(again.added(), 0, "re-importing adds nothing");
    let reimport = (took, peak);
    drop(store);
    settle();
    let (saved, took, peak) = measured(|| sqlite_import(&file, &work.path().join("peer.sqlite")));
    assert_eq!(saved, records);
    let sqlite = (took, peak);
    eprintln!("exchanged {} records ({bytes} bytes) for the store of {} readings", records, p.readings);
    Exchanged { readings: p.readings, records, bytes, export, plain, import, reimport, sqlite }
}

fn exchange_summary(rows: &[Exchanged]) {
    if rows.is_empty() {
        return;
    }
    let per_s = |n: usize, d: Duration| n as f64 / d.as_secs_f64();
    let mb_s = |b: u64, d: Duration| b as f64 / 1e6 / d.as_secs_f64();
    println!("\nexport and import (one run each; peak = resident high-water mark over the resident before, MiB):");
    println!(
        "{:>9} {:>9} {:>11} | {:>10} {:>9} {:>8} {:>9} {:>6} {:>6} | {:>9} {:>9} {:>6} | {:>9} {:>6} | {:>9} {:>6} {:>6}",
        "readings",
        "records",
        "bytes",
        "export/s",
        "MB/s",
        "plain",
        "MB/s",
        "ratio",
        "peak",
        "import/s",
        "time",
        "peak",
        "again/s",
        "peak",
        "SQLite/s",
        "peak",
        "ratio"
    );
    for r in rows {
        println!(
            "{:>9} {:>9} {:>11} | {:>10.0} {:>9.1} {:>8} {:>9.1} {:>6.1} {:>6.0} | {:>9.0} {:>9} {:>6.0} | {:>9.0} {:>6.0} | {:>9.0} {:>6.0} {:>6.2}",
            r.readings,
            r.records,
            r.bytes,
            per_s(r.records, r.export.0),
            mb_s(r.bytes, r.export.0),
            fmt(r.plain),
            mb_s(r.bytes, r.plain),
            r.export.0.as_secs_f64() / r.plain.as_secs_f64(),
            r.export.1,
            per_s(r.records, r.import.0),
            fmt(r.import.0),
            r.import.1,
            per_s(r.records, r.reimport.0),
            r.reimport.1,
            per_s(r.records, r.sqlite.0),
            r.sqlite.1,
            r.import.0.as_secs_f64() / r.sqlite.0.as_secs_f64(),
        );
    }
    if let (Some(small), Some(big)) = (rows.first(), rows.last()) {
        let x = big.records as f64 / small.records as f64;
        println!("growth from {} to {} readings (records x{x:.0}; x{x:.0} is linear):", small.readings, big.readings);
        for (what, a, b) in [
            ("export", small.export.0, big.export.0),
            ("import", small.import.0, big.import.0),
            ("re-import", small.reimport.0, big.reimport.0),
            ("SQLite import", small.sqlite.0, big.sqlite.0),
        ] {
            println!("{what:<14} {} -> {}  x{:.1}", fmt(a), fmt(b), b.as_secs_f64() / a.as_secs_f64());
        }
    }
}

fn fmt(d: Duration) -> String {
    let s = d.as_secs_f64();
    if s >= 1.0 {
        format!("{s:.2} s")
    } else if s >= 1e-3 {
        format!("{:.2} ms", s * 1e3)
    } else {
        format!("{:.1} µs", s * 1e6)
    }
}

fn summary(prepared: &[Prepared]) {
    let rows: [(&str, &str, &str); 7] = [
        ("open the store, beside SQLite", "open", "open sqlite"),
        ("open the store, beside sled's own open", "open", "open sled"),
        ("start to first frame, beside SQLite", "first frame", "first frame sqlite"),
        ("start to first frame, beside the same frame from memory", "first frame", "first frame floor"),
        ("history of one tank, 90 days, beside SQLite", "history", "history sqlite"),
        ("board frame, 1,000 tanks, 160x48, beside plain text", "board frame", "text frame"),
        ("walk frame, 160x48, beside plain text", "walk frame", "text frame"),
    ];
    println!("\nagainst the limits (medians of every timed operation):");
    println!("{:<58} {:>10} {:>11} {:>11} {:>7}", "", "readings", "tankwalk", "peer/floor", "ratio");
    for (label, ours, other) in rows {
        for p in prepared {
            let (n, size) = (p.readings, p.size);
            if let (Some(a), Some(b)) = (median(ours, size), median(other, size)) {
                println!(
                    "{label:<58} {n:>10} {:>11} {:>11} {:>7.2}",
                    fmt(a),
                    fmt(b),
                    a.as_secs_f64() / b.as_secs_f64()
                );
            }
        }
    }
    println!("\ngrowth from 10,000 to 1,000,000 readings (x100): 1 is flat, 100 is linear");
    for what in [
        "open",
        "first frame",
        "history",
        "board frame",
        "walk frame",
        "open sqlite",
        "first frame sqlite",
        "history sqlite",
    ] {
        let (Some(small), Some(big)) = (median(what, 10_000), median(what, 1_000_000)) else { continue };
        let mid = median(what, 100_000).map(fmt).unwrap_or_default();
        println!(
            "{what:<20} 10k {:>10}  100k {:>10}  1M {:>10}  growth x{:.1}",
            fmt(small),
            mid,
            fmt(big),
            big.as_secs_f64() / small.as_secs_f64()
        );
    }
}

criterion_group!(benches, against_the_limits);
criterion_main!(benches);
