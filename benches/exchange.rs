//! Export, import and re-import of a million generated readings: records per
//! second, peak memory of each step, and the export's bytes per second beside
//! a plain sequential write of the same number of bytes, measured in the same
//! run on the same disk.
//!
//! `cargo bench --bench exchange` (data in a temporary folder under `TMPDIR`:
//! point it at the disk you care about). `TANKWALK_BENCH_READINGS` changes the
//! number of readings (default 1,000,000), `TANKWALK_BENCH_ROUNDS` the number of
//! times each export and write is repeated (default 3; the median is shown).
//!
//! Peak memory is the process's resident high-water mark (`VmHWM` in
//! `/proc/self/status`), reset before each step (Linux `clear_refs` 5), so
//! each step's figure is its own peak, the store's caches included.

#[path = "support/plain_write.rs"]
mod plain;
use plain::plain_write;
use std::fs;
use std::time::{Duration, Instant};

use chrono::{FixedOffset, TimeZone};
use tankwalk::core::units::{AmmoniaBasis, NitrogenIonBasis};
use tankwalk::exchange::{self, ConflictLog, ExportOptions, Formats, no_progress};
use tankwalk::model::record::*;
use tankwalk::store::{SledStore, Store};

/// Readings saved per append while building the store.
const BUILD_BATCH: usize = 10_000;

fn env_number(name: &str, default: usize) -> usize {
    std::env::var(name).ok().and_then(|v| v.replace('_', "").parse().ok()).unwrap_or(default)
}

/// A year of rounds in a 2,000-tank facility, from three laptops.
fn reading(i: usize, devices: &[DeviceId]) -> Record {
    let tank = i % 2000;
    let mut r = Reading::new(Target::Tank(format!("R{:02}-{:02}", tank / 48 + 1, tank % 48 + 1)));
    let m = &mut r.measurements;
    m.temperature = Some(Temperature::celsius(22.0 + (i % 70) as f64 / 10.0));
    m.ph = Some(6.4 + (i % 31) as f64 / 20.0);
    m.total_ammonia = Some(TotalAmmonia { value: (i % 40) as f64 / 40.0, basis: AmmoniaBasis::N });
    if i.is_multiple_of(5) {
        m.nitrite = Some(NitrogenReading { value: (i % 9) as f64 / 10.0, basis: NitrogenIonBasis::N });
    }
    if i.is_multiple_of(20) {
        r.note = Some(format!("fish off feed, rechecked after {} minutes", i % 60));
    }
    let start = FixedOffset::east_opt(3600).unwrap().with_ymd_and_hms(2025, 12, 1, 6, 0, 0).unwrap();
    let taken_at = start + chrono::Duration::seconds((i as i64) * 31);
    Record::new(devices[i % devices.len()], "Bench Operator", taken_at, RecordBody::Reading(r))
}

/// Resets the peak resident memory (Linux), so the next peak is the next step's own.
fn reset_peak() {
    let _ = fs::write("/proc/self/clear_refs", "5");
}

/// A line of `/proc/self/status` in MiB (`VmHWM`, `VmRSS`).
fn status_mib(key: &str) -> f64 {
    let status = fs::read_to_string("/proc/self/status").unwrap_or_default();
    let kib: f64 = status
        .lines()
        .find(|l| l.starts_with(key))
        .and_then(|l| l.split_whitespace().nth(1))
        .and_then(|v| v.parse().ok())
        .unwrap_or(f64::NAN);
    kib / 1024.0
}

/// Memory of one step, MiB: resident when it began, and its peak.
#[derive(Debug, Clone, Copy)]
struct Memory {
    before: f64,
    peak: f64,
}

impl std::fmt::Display for Memory {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        write!(
            f,
            "{:.0} MiB (+{:.0} over the {:.0} MiB resident before)",
            self.peak,
            self.peak - self.before,
            self.before
        )
    }
}

/// Runs `step` with a fresh peak; returns its time and memory.
fn measured<T>(step: impl FnOnce() -> T) -> (T, Duration, Memory) {
    reset_peak();
    let before = status_mib("VmRSS:");
    let started = Instant::now();
    let out = step();
    (out, started.elapsed(), Memory { before, peak: status_mib("VmHWM:") })
}

fn median(mut xs: Vec<f64>) -> f64 {
    xs.sort_by(f64::total_cmp);
    xs[xs.len() / 2]
}

/// The timings of one kind of export, per round.
struct ExportRow {
    label: &'static str,
    secs: Vec<f64>,
    peaks: Vec<Memory>,
    plain: Vec<f64>,
    ratio: Vec<f64>,
    bytes: u64,
}

fn main() {
    // `cargo bench` passes `--bench`; a filter argument is accepted and ignored.
    let readings = env_number("TANKWALK_BENCH_READINGS", 1_000_000);
    let rounds = env_number("TANKWALK_BENCH_ROUNDS", 3).max(1);
    let work = tempfile::tempdir().unwrap();
    println!("{readings} readings, {rounds} rounds, in {}", work.path().display());

    let devices: Vec<DeviceId> = (0..3).map(|_| DeviceId::generate()).collect();
    let started = Instant::now();
    let mut store = SledStore::open(&work.path().join("first")).unwrap();
    let mut batch = Vec::with_capacity(BUILD_BATCH);
    for i in 0..readings {
        batch.push(reading(i, &devices));
        if batch.len() == BUILD_BATCH || i + 1 == readings {
            store.append(&batch).unwrap();
            batch.clear();
        }
    }
    println!("built the store in {:.1} s", started.elapsed().as_secs_f64());

    // Exports, each beside a plain write of the same number of bytes.
    let mut rows: Vec<ExportRow> = Vec::new();
    for (label, formats) in [("JSON Lines only", Formats::Jsonl), ("JSON Lines + CSV", Formats::Both)] {
        let (mut secs, mut peaks, mut plain, mut ratio) = (Vec::new(), Vec::new(), Vec::new(), Vec::new());
        let mut bytes = 0;
        for round in 0..rounds {
            let out = work.path().join(format!("export-{round}"));
            let options = ExportOptions { formats, ..ExportOptions::default() };
            let (summary, took, peak) =
                measured(|| exchange::export(&store, &out, &options, &mut no_progress).unwrap());
            assert_eq!(summary.records, readings as u64);
            bytes = summary.files.iter().map(|f| f.bytes).sum::<u64>();
            let floor = plain_write(&work.path().join("plain"), bytes);
            secs.push(took.as_secs_f64());
            peaks.push(peak);
            plain.push(floor.as_secs_f64());
            ratio.push(took.as_secs_f64() / floor.as_secs_f64());
            fs::remove_dir_all(&out).unwrap();
        }
        rows.push(ExportRow { label, secs, peaks, plain, ratio, bytes });
    }
    println!();
    println!(
        "| export | records/s | MB/s | plain write of the same bytes, MB/s | time ratio export / plain | bytes | peak memory (highest round) |"
    );
    println!("|---|---|---|---|---|---|---|");
    for ExportRow { label, secs, peaks, plain, ratio, bytes } in &rows {
        let (s, p) = (median(secs.clone()), median(plain.clone()));
        println!(
            "| {label} | {:.0} | {:.1} | {:.1} | {:.1} | {} | {} |",
            readings as f64 / s,
            *bytes as f64 / s / 1e6,
            *bytes as f64 / p / 1e6,
            median(ratio.clone()),
            bytes,
            peaks.iter().max_by(|a, b| a.peak.total_cmp(&b.peak)).unwrap()
        );
    }

    // Import into a fresh store, then the same file again (every record already there).
    let out = work.path().join("export");
    exchange::export(
        &store,
        &out,
        &ExportOptions { formats: Formats::Jsonl, ..ExportOptions::default() },
        &mut no_progress,
    )
    .unwrap();
    drop(store);
    let file = out.join(exchange::export::RECORDS_FILE);
    let mut second = SledStore::open(&work.path().join("second")).unwrap();
    let log = ConflictLog::in_data_dir(&work.path().join("second"), second.device());
    let (summary, import_time, import_peak) =
        measured(|| exchange::import(&mut second, &log, std::slice::from_ref(&file), &mut no_progress).unwrap());
    assert_eq!(summary.added(), readings);
    let mut again = Vec::new();
    let mut again_peaks = Vec::new();
    for _ in 0..rounds {
        let (summary, took, peak) =
            measured(|| exchange::import(&mut second, &log, std::slice::from_ref(&file), &mut no_progress).unwrap());
        assert_eq!(summary.added(), 0);
        again.push(took.as_secs_f64());
        again_peaks.push(peak);
    }
    assert_eq!(second.len().unwrap(), readings);
    println!();
    println!("| import | records/s | time (median) | peak memory (highest round) |");
    println!("|---|---|---|---|");
    println!(
        "| into a fresh store | {:.0} | {:.1} s | {} |",
        readings as f64 / import_time.as_secs_f64(),
        import_time.as_secs_f64(),
        import_peak
    );
    let again_s = median(again);
    println!(
        "| the same file again (all present) | {:.0} | {:.1} s | {} |",
        readings as f64 / again_s,
        again_s,
        again_peaks.iter().max_by(|a, b| a.peak.total_cmp(&b.peak)).unwrap()
    );
}
