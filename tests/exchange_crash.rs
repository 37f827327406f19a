//! Killing `export`, `import` and `sync` (SIGKILL on Unix) at random moments
//! never leaves a half file under a real name and never loses a record;
//! running the command again completes the work.
//!
//! Each test kills a handful of times (the seed is printed, to replay a failure);
//! the long versions (ignored by default) kill each command 200 times:
//! `cargo test --release --test exchange_crash -- --ignored --nocapture`.

use std::collections::BTreeSet;
use std::fs;
use std::path::Path;
use std::process::{Command, Stdio};
use std::time::{Duration, Instant, SystemTime, UNIX_EPOCH};

use chrono::{FixedOffset, TimeZone};
use tankwalk::core::units::AmmoniaBasis;
use tankwalk::exchange::{check_file, manifest::Manifest, no_progress, sha256_hex, spreadsheet::COLUMNS};
use tankwalk::model::record::*;
use tankwalk::store::{SledStore, Store, repair};
use ulid::Ulid;

const RECORDS: usize = 500;
const KILLS: usize = 6;
/// Kills of each command in the long versions.
const SOAK_KILLS: usize = 200;

/// xorshift64*, seeded from the clock and printed.
struct Rng(u64);

impl Rng {
    fn seeded() -> Rng {
        let seed = SystemTime::now().duration_since(UNIX_EPOCH).unwrap().as_nanos() as u64 | 1;
        eprintln!("seed {seed}");
        Rng(seed)
    }

    fn below(&mut self, n: u64) -> u64 {
        self.0 ^= self.0 >> 12;
        self.0 ^= self.0 << 25;
        self.0 ^= self.0 >> 27;
        self.0.wrapping_mul(0x2545_f491_4f6c_dd1d) % n.max(1)
    }
}

fn command(dir: &Path, args: &[&str]) -> Command {
    let mut cmd = Command::new(env!("CARGO_BIN_EXE_tankwalk"));
    cmd.args(args).env_clear().env("TANKWALK_DATA", dir).env("TZ", "UTC-1");
    cmd.stdout(Stdio::null()).stderr(Stdio::piped());
    cmd
}

fn run(dir: &Path, args: &[&str]) -> Duration {
    let started = Instant::now();
    let out = command(dir, args).output().unwrap();
    assert!(out.status.success(), "{args:?}: {}", String::from_utf8_lossy(&out.stderr));
    started.elapsed()
}

/// Starts the command and kills it after a random part of `typical`; true when it was still running.
fn kill_somewhere(dir: &Path, args: &[&str], typical: Duration, rng: &mut Rng) -> bool {
    let mut child = command(dir, args).spawn().unwrap();
    std::thread::sleep(Duration::from_micros(rng.below(typical.as_micros() as u64 * 11 / 10)));
    let running = child.try_wait().unwrap().is_none();
    if running {
        child.kill().unwrap();
    }
    child.wait().unwrap();
    running
}

fn readings(n: usize) -> Vec<Record> {
    let device = DeviceId::generate();
    let start = FixedOffset::east_opt(3600).unwrap().with_ymd_and_hms(2026, 11, 1, 7, 0, 0).unwrap();
    (0..n)
        .map(|i| {
            let mut r = Reading::new(Target::Tank(format!("R{}-{:02}", i % 4, i % 12)));
            r.measurements.temperature = Some(Temperature::celsius(24.0 + (i % 30) as f64 / 10.0));
            r.measurements.ph = Some(7.0 + (i % 40) as f64 / 40.0);
            r.measurements.total_ammonia = Some(TotalAmmonia { value: 0.25, basis: AmmoniaBasis::N });
            r.note = (i % 7 == 0).then(|| format!("=check {i}"));
            Record::new(device, "Crash Test", start + chrono::Duration::minutes(i as i64), RecordBody::Reading(r))
        })
        .collect()
}

fn ids(dir: &Path) -> BTreeSet<Ulid> {
    let store = SledStore::open(dir).unwrap();
    let ids = store.all().unwrap().map(|r| r.unwrap().id).collect();
    drop(store);
    let report = repair::examine(dir).unwrap();
    assert!(report.problems().is_empty(), "the journal and the database agree: {:?}", report.problems());
    ids
}

/// Every file under a real name in an export folder is whole (and matches the manifest when listed).
fn check_export_folder(out: &Path) {
    let Ok(entries) = fs::read_dir(out) else { return };
    for entry in entries {
        let path = entry.unwrap().path();
        let name = path.file_name().unwrap().to_string_lossy().into_owned();
        match name.as_str() {
            "records.jsonl" => {
                let checked = check_file(&path, &mut no_progress).unwrap_or_else(|p| panic!("half file: {p:?}"));
                assert_eq!(checked.records.len(), RECORDS);
            }
            "readings.csv" => {
                let bytes = fs::read(&path).unwrap();
                let mut reader = csv::Reader::from_reader(&bytes[3..]);
                let rows: Vec<_> = reader.records().map(|r| r.unwrap()).collect();
                assert_eq!(rows.len(), RECORDS);
                assert!(rows.iter().all(|r| r.len() == COLUMNS.len()));
                assert!(bytes.ends_with(b"\r\n"));
                if let Ok(text) = fs::read_to_string(out.join("manifest.json")) {
                    let entry = Manifest::parse(&text).unwrap().entry("readings.csv").cloned().unwrap();
                    assert_eq!(entry.sha256, sha256_hex(&bytes), "the manifest describes the CSV beside it");
                }
            }
            "manifest.json" => {
                Manifest::parse(&fs::read_to_string(&path).unwrap()).unwrap();
            }
            other => assert!(other.starts_with('.') && other.ends_with(".partial"), "unexpected file {other}"),
        }
    }
}

#[test]
fn killing_export_never_leaves_a_half_file() {
    export_with_kills(KILLS);
}

#[test]
#[ignore = "long soak: run with --ignored (ideally --release)"]
fn killing_export_two_hundred_times_never_leaves_a_half_file() {
    export_with_kills(SOAK_KILLS);
}

/// Kills `export` `kills` times; no half file under a real name, the store untouched.
fn export_with_kills(kills: usize) {
    let mut rng = Rng::seeded();
    let data = tempfile::tempdir().unwrap();
    let dir = data.path();
    let mut store = SledStore::open(dir).unwrap();
    store.append(&readings(RECORDS)).unwrap();
    drop(store);
    let journal = fs::read(dir.join("journal.jsonl")).unwrap();
    let out = data.path().join("export");
    let args = ["export", "--out", out.to_str().unwrap()];
    let typical = run(dir, &args);
    let mut killed = 0;
    while killed < kills {
        killed += usize::from(kill_somewhere(dir, &args, typical, &mut rng));
        check_export_folder(&out);
    }
    assert_eq!(fs::read(dir.join("journal.jsonl")).unwrap(), journal, "an export changes nothing in the store");
    run(dir, &args);
    check_export_folder(&out);
    let left: Vec<_> = fs::read_dir(&out).unwrap().map(|e| e.unwrap().file_name()).collect();
    assert_eq!(left.len(), 3, "the temporary files of the killed exports are cleaned up: {left:?}");
}

#[test]
fn killing_import_loses_nothing_and_importing_again_completes_it() {
    import_with_kills(KILLS);
}

#[test]
#[ignore = "long soak: run with --ignored (ideally --release)"]
fn killing_import_two_hundred_times_loses_nothing() {
    import_with_kills(SOAK_KILLS);
}

/// Kills `import` `kills` times; nothing stored before is lost, nothing but the file comes in.
fn import_with_kills(kills: usize) {
    let mut rng = Rng::seeded();
    let work = tempfile::tempdir().unwrap();
    let (a, b) = (work.path().join("a"), work.path().join("b"));
    let mut store = SledStore::open(&a).unwrap();
    let incoming = readings(RECORDS);
    store.append(&incoming).unwrap();
    drop(store);
    let out = work.path().join("export");
    run(&a, &["export", "--out", out.to_str().unwrap(), "--format", "jsonl"]);
    let mut store = SledStore::open(&b).unwrap();
    let own = readings(5);
    store.append(&own).unwrap();
    drop(store);
    let own: BTreeSet<Ulid> = own.iter().map(|r| r.id).collect();
    let everything: BTreeSet<Ulid> = own.iter().copied().chain(incoming.iter().map(|r| r.id)).collect();

    let file = out.join("records.jsonl");
    let args = ["import", file.to_str().unwrap()];
    // Time a whole import on a copy of B.
    let probe = work.path().join("probe");
    fs::create_dir(&probe).unwrap();
    fs::copy(b.join("journal.jsonl"), probe.join("journal.jsonl")).unwrap();
    let typical = run(&probe, &args);
    let mut killed = 0;
    while killed < kills {
        killed += usize::from(kill_somewhere(&b, &args, typical, &mut rng));
        let now = ids(&b);
        assert!(now.is_superset(&own), "records saved before the import are kept");
        assert!(now.is_subset(&everything), "nothing but the file's records came in");
    }
    run(&b, &args);
    assert_eq!(ids(&b), everything);
}

#[test]
fn killing_sync_never_leaves_a_half_segment_and_loses_nothing() {
    sync_with_kills(KILLS);
}

#[test]
#[ignore = "long soak: run with --ignored (ideally --release)"]
fn killing_sync_two_hundred_times_loses_nothing() {
    sync_with_kills(SOAK_KILLS);
}

/// Kills `sync` `kills` times on the sending laptop, then on the receiving one.
fn sync_with_kills(kills: usize) {
    let mut rng = Rng::seeded();
    let work = tempfile::tempdir().unwrap();
    let (a, b) = (work.path().join("a"), work.path().join("b"));
    let shared = work.path().join("shared");
    fs::create_dir(&shared).unwrap();
    let mut store = SledStore::open(&a).unwrap();
    store.append(&readings(RECORDS)).unwrap();
    drop(store);
    let args = ["sync", shared.to_str().unwrap()];
    // Time a whole sync into a folder of its own.
    let probe = work.path().join("probe");
    fs::create_dir(&probe).unwrap();
    let typical = run(&a, &["sync", probe.to_str().unwrap()]);
    let mut killed = 0;
    while killed < kills {
        killed += usize::from(kill_somewhere(&a, &args, typical, &mut rng));
        check_segments(&shared);
    }
    run(&a, &args);
    check_segments(&shared);

    // The receiving laptop, with records of its own, killed while it reads A's
    // segments and writes its own.
    let mut store = SledStore::open(&b).unwrap();
    let own = readings(7);
    store.append(&own).unwrap();
    drop(store);
    let own: BTreeSet<Ulid> = own.iter().map(|r| r.id).collect();
    let everything: BTreeSet<Ulid> = ids(&a).union(&own).copied().collect();
    // Time a whole sync of B on copies (B's journal, the shared folder), so B's own folder stays untouched.
    let (probe, probe_shared) = (work.path().join("probe-b"), work.path().join("probe-shared"));
    fs::create_dir(&probe).unwrap();
    fs::copy(b.join("journal.jsonl"), probe.join("journal.jsonl")).unwrap();
    copy_tree(&shared, &probe_shared);
    let typical = run(&probe, &["sync", probe_shared.to_str().unwrap()]);
    let mut killed = 0;
    while killed < kills {
        killed += usize::from(kill_somewhere(&b, &args, typical, &mut rng));
        let now = ids(&b);
        assert!(now.is_superset(&own), "the receiving laptop keeps its own records");
        assert!(now.is_subset(&everything), "nothing but the two laptops' records");
        check_segments(&shared);
    }
    run(&b, &args);
    run(&a, &args);
    assert_eq!(ids(&b), everything, "the receiving laptop has every record, once");
    assert_eq!(ids(&a), everything, "and so has the sending one");
}

fn copy_tree(from: &Path, to: &Path) {
    fs::create_dir_all(to).unwrap();
    for entry in fs::read_dir(from).unwrap() {
        let path = entry.unwrap().path();
        let target = to.join(path.file_name().unwrap());
        if path.is_dir() { copy_tree(&path, &target) } else { fs::copy(&path, &target).map(|_| ()).unwrap() }
    }
}

/// Every segment under a real name in the shared folder is whole.
fn check_segments(shared: &Path) {
    for device in fs::read_dir(shared).unwrap() {
        for file in fs::read_dir(device.unwrap().path()).unwrap() {
            let path = file.unwrap().path();
            let name = path.file_name().unwrap().to_string_lossy().into_owned();
            if name.starts_with("segment-") {
                check_file(&path, &mut no_progress).unwrap_or_else(|p| panic!("half segment: {p:?}"));
            } else {
                assert!(name.starts_with('.') && name.ends_with(".partial"), "unexpected file {name}");
            }
        }
    }
}
