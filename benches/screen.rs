//! The screen's speed: a frame of the board for a 1,000-tank room, a frame of
//! the walk, one key press through update, and start to first frame with
//! 100,000 stored readings. Goal (issue 6): under 2 ms a frame in release.
//!
//! `cargo bench --bench screen`; results go in BENCHMARKS.md.

use std::hint::black_box;
use std::path::Path;
use std::time::Duration;

use chrono::{DateTime, FixedOffset, TimeZone};
use criterion::{BatchSize, Criterion, criterion_group, criterion_main};
use ratatui::Terminal;
use ratatui::backend::TestBackend;
use tankwalk::model::facility::Facility;
use tankwalk::model::record::{DeviceId, Record};
use tankwalk::store::{SledStore, Store, TimeRange};
use tankwalk::tui::keymap::{Key, Keymap};
use tankwalk::tui::state::{App, Input, SessionInfo, update};
use tankwalk::tui::view;
use ulid::Ulid;

fn now() -> DateTime<FixedOffset> {
    FixedOffset::east_opt(3600).unwrap().with_ymd_and_hms(2026, 12, 1, 7, 40, 0).unwrap()
}

fn session() -> SessionInfo {
    SessionInfo { operator: "Bench".into(), device: DeviceId(Ulid::from_parts(1, 1)), id_seed: 1 }
}

fn app_with(facility: Facility, records: Vec<Record>) -> App {
    let mut app = App::new(facility, records, session(), now());
    app.colour = false;
    app
}

fn harbourside() -> (Facility, Vec<Record>) {
    let facility = Facility::load(Path::new("sample-rooms/harbourside-holding.toml")).expect("sample room");
    let records = tankwalk::demo::history(&facility, DeviceId(Ulid::from_parts(1, 1)), now(), 60, 11);
    (facility, records)
}

fn press(app: &mut App, keymap: &Keymap, keys: &str) {
    for k in keys.split(' ') {
        let key: Key = k.parse().expect("a key");
        update(app, keymap, Input::Key(key), now());
    }
}

fn frames(c: &mut Criterion) {
    let keymap = Keymap::default_map();
    // 40 racks of 20 tanks and 200 tubs: 1,000 tanks, 30 days of history.
    let room = tankwalk::demo::generated_room(40, 200);
    let history = tankwalk::demo::history(&room, DeviceId(Ulid::from_parts(1, 1)), now(), 30, 5);
    let board = app_with(room, history);
    let mut group = c.benchmark_group("frame");
    group.measurement_time(Duration::from_secs(5));
    for (w, h) in [(80, 24), (160, 48)] {
        let mut terminal = Terminal::new(TestBackend::new(w, h)).expect("test backend");
        group.bench_function(format!("board, 1000 tanks, {w}x{h}"), |b| {
            b.iter(|| terminal.draw(|f| view::render(black_box(&board), &keymap, f)).map(|_| ()))
        });
    }
    let (facility, records) = harbourside();
    let mut walk = app_with(facility, records);
    press(&mut walk, &keymap, "w 2 5 . 5 enter 7 . 6 enter 0 . 4");
    for (w, h) in [(80, 24), (160, 48)] {
        let mut terminal = Terminal::new(TestBackend::new(w, h)).expect("test backend");
        group.bench_function(format!("walk, typing, {w}x{h}"), |b| {
            b.iter(|| terminal.draw(|f| view::render(black_box(&walk), &keymap, f)).map(|_| ()))
        });
    }
    group.finish();

    // One key press through update (the verdict is recomputed on every key).
    let mut group = c.benchmark_group("key press");
    group.bench_function("walk: type a digit (update + assessment)", |b| {
        b.iter_batched(
            || walk.clone(),
            |mut app| update(&mut app, &keymap, Input::Key(Key::char('5')), now()),
            BatchSize::SmallInput,
        )
    });
    group.finish();
}

fn start(c: &mut Criterion) {
    let keymap = Keymap::default_map();
    // 1,000 tanks; 240 waters a day for 417 days: 100,080 readings (plus water changes).
    let room = tankwalk::demo::generated_room(40, 200);
    let records = tankwalk::demo::history(&room, DeviceId(Ulid::from_parts(1, 1)), now(), 417, 9);
    let readings = records.iter().filter(|r| r.body.as_reading().is_some()).count();
    eprintln!("start: {} records, {readings} readings", records.len());
    let mut group = c.benchmark_group("start to first frame");
    group.sample_size(10);
    group.measurement_time(Duration::from_secs(20));
    group.bench_function(format!("{readings} readings in memory, 1000 tanks: build state + first frame"), |b| {
        b.iter_batched(
            || records.clone(),
            |records| {
                let app = app_with(room.clone(), records);
                let mut terminal = Terminal::new(TestBackend::new(160, 48)).expect("test backend");
                terminal.draw(|f| view::render(&app, &keymap, f)).map(|_| ())
            },
            BatchSize::LargeInput,
        )
    });
    // The same from a store on disk: open (journal + sled), read the last 90
    // days of records, build the state, draw (what `tankwalk` does before the first frame).
    let dir = tempfile::tempdir().expect("a temporary folder");
    {
        let mut store = SledStore::open(dir.path()).expect("a new store");
        for batch in records.chunks(5_000) {
            store.append(batch).expect("saved");
        }
    }
    group.bench_function(
        format!("{readings} readings in a store on disk, 1000 tanks: open + load + state + frame"),
        |b| {
            b.iter(|| {
                let store = SledStore::open(dir.path()).expect("the store opens");
                let since = (now() - chrono::Duration::days(90)).with_timezone(&chrono::Utc);
                let loaded: Vec<Record> = store.history(&[], &TimeRange::new(Some(since), None)).expect("records");
                let app = app_with(room.clone(), loaded);
                let mut terminal = Terminal::new(TestBackend::new(160, 48)).expect("test backend");
                terminal.draw(|f| view::render(&app, &keymap, f)).map(|_| ())
            })
        },
    );
    group.finish();
}

criterion_group!(benches, frames, start);
criterion_main!(benches);
