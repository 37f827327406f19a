//! Fuzzing every parser that takes outside input, with random input and with
//! valid samples mutated (cut short, bytes flipped, quotes, newlines, huge
//! numbers and bytes that are not UTF-8 put in, pieces deleted or repeated).
//!
//! Every case must end without a panic, and every refusal must say where the
//! mistake is: file, line (and column) for files, the field for a record, the
//! option for the command line.
//!
//! The CI version runs a few hundred cases per parser (a few seconds each);
//! `TANKWALK_FUZZ_CASES=100000 cargo test --release --test fuzz_inputs` runs
//! the long version (results in BENCHMARKS.md).

use std::path::Path;

use proptest::prelude::*;
use proptest::sample::Index;
use proptest::test_runner::{Config, FileFailurePersistence};
use tankwalk::exchange;
use tankwalk::model::facility::Facility;
use tankwalk::model::record::{DeviceId, Record};
use tankwalk::store::journal::{self, Header};
use tankwalk::store::{SledStore, Store, StoreError};
use tankwalk::tui::keymap::{DEFAULT_KEYMAP_ORIGIN, Keymap, keymap_text};
use tankwalk::tui::state::field::{FieldKind, MAX_FIELD_CHARS, NumberField, Parsed};

/// Cases per parser: `TANKWALK_FUZZ_CASES`, else `ci` (scaled for the slow ones).
fn config(ci: u32) -> Config {
    let cases = std::env::var("TANKWALK_FUZZ_CASES").ok().and_then(|v| v.parse::<u32>().ok());
    Config {
        // The slow parsers (those that open a store or start a process) keep their share.
        cases: cases.map_or(ci, |n| (u64::from(n) * u64::from(ci) / 256).clamp(1, u64::from(u32::MAX)) as u32),
        failure_persistence: Some(Box::new(FileFailurePersistence::WithSource("proptest-regressions"))),
        ..Config::default()
    }
}

// ---------------------------------------------------------------------------
// Mutations of valid samples

#[derive(Debug, Clone)]
enum Mutation {
    Truncate(Index),
    Flip(Index, u8),
    Insert(Index, Vec<u8>),
    Delete(Index, usize),
    Repeat(Index, Index, usize),
}

/// Bytes that break parsers: quotes, line ends, brackets, huge or odd
/// numbers, NUL, bytes that are never UTF-8, a lone surrogate, a BOM, long text.
fn nasty() -> impl Strategy<Value = Vec<u8>> {
    let fixed: Vec<&'static [u8]> = vec![
        b"\"",
        b"'",
        b"\n",
        b"\r\n",
        b"\r",
        b"[",
        b"]",
        b"[[",
        b"{",
        b"}",
        b"=",
        b",",
        b"#",
        b"\\",
        b"\\u0000",
        b"\\ud800",
        b"\0",
        b"1e309",
        b"-1e400",
        b"99999999999999999999999999999999",
        b"-9223372036854775809",
        b"18446744073709551616",
        b"NaN",
        b"inf",
        b"-0",
        b"0.0000000000000000000000000001",
        b"true",
        b"null",
        b"\xff",
        b"\xc3",
        b"\xed\xa0\x80",
        b"\xef\xbb\xbf",
        "°C".as_bytes(),
        "🐟".as_bytes(),
        "\u{202e}".as_bytes(),
    ];
    prop_oneof![
        6 => prop::sample::select(fixed).prop_map(<[u8]>::to_vec),
        1 => Just("x".repeat(5000).into_bytes()),
        2 => prop::collection::vec(any::<u8>(), 1..8),
    ]
}

fn mutation() -> impl Strategy<Value = Mutation> {
    prop_oneof![
        any::<Index>().prop_map(Mutation::Truncate),
        (any::<Index>(), 1..=255u8).prop_map(|(i, x)| Mutation::Flip(i, x)),
        (any::<Index>(), nasty()).prop_map(|(i, b)| Mutation::Insert(i, b)),
        (any::<Index>(), 1..40usize).prop_map(|(i, n)| Mutation::Delete(i, n)),
        (any::<Index>(), any::<Index>(), 1..200usize).prop_map(|(a, b, n)| Mutation::Repeat(a, b, n)),
    ]
}

fn apply(mut bytes: Vec<u8>, mutations: &[Mutation]) -> Vec<u8> {
    for m in mutations {
        let len = bytes.len();
        let at = |i: &Index| if len == 0 { 0 } else { i.index(len + 1) };
        match m {
            Mutation::Truncate(i) => bytes.truncate(at(i)),
            Mutation::Flip(i, x) if len > 0 => bytes[i.index(len)] ^= x,
            Mutation::Flip(..) => {}
            Mutation::Insert(i, b) => {
                let at = at(i);
                bytes.splice(at..at, b.iter().copied());
            }
            Mutation::Delete(i, n) => {
                let at = at(i);
                bytes.drain(at..(at + n).min(len));
            }
            Mutation::Repeat(from, to, n) => {
                let (from, to) = (at(from), at(to));
                let piece: Vec<u8> = bytes[from..(from + n).min(len)].to_vec();
                bytes.splice(to..to, piece);
            }
        }
    }
    bytes
}

/// Mostly mutated samples; some purely random bytes and some random text.
fn input_from(samples: Vec<Vec<u8>>) -> impl Strategy<Value = Vec<u8>> {
    prop_oneof![
        8 => (prop::sample::select(samples), prop::collection::vec(mutation(), 1..5))
            .prop_map(|(sample, ms)| apply(sample, &ms)),
        1 => prop::collection::vec(any::<u8>(), 0..400),
        1 => "[ -~\n\t\"'\\[\\]=#.,0-9a-z°µ]{0,400}".prop_map(String::into_bytes),
    ]
}

fn line_count(bytes: &[u8]) -> usize {
    bytes.iter().filter(|b| **b == b'\n').count() + 1
}

fn samples_in(folder: &str) -> Vec<Vec<u8>> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join(folder);
    let mut files: Vec<_> = std::fs::read_dir(&dir).unwrap().map(|e| e.unwrap().path()).collect();
    files.sort();
    files.iter().filter(|p| p.extension().is_some_and(|e| e == "toml")).map(|p| std::fs::read(p).unwrap()).collect()
}

// ---------------------------------------------------------------------------
// Facility files

const ROOM_ORIGIN: &str = "fuzz-room.toml";

fn check_facility(bytes: &[u8]) -> Result<(), TestCaseError> {
    let origin = Path::new(ROOM_ORIGIN);
    match Facility::check_bytes(bytes, origin, None) {
        Ok(checked) => {
            // Whatever is accepted writes back to a file that loads again.
            let written = checked.facility.to_toml_string();
            let again = Facility::parse(&written, origin);
            prop_assert!(again.is_ok(), "accepted, but its own TOML does not load: {:?}\n{written}", again.err());
        }
        Err(errors) => {
            prop_assert!(!errors.errors.is_empty());
            for p in &errors.errors {
                prop_assert_eq!(&p.file, origin);
                prop_assert!(
                    (1..=line_count(bytes)).contains(&p.line),
                    "line {} of {}: {p}",
                    p.line,
                    line_count(bytes)
                );
                prop_assert!(p.column >= 1, "{p}");
                prop_assert!(!p.message.trim().is_empty(), "{p:?}");
                let prefix = format!("{ROOM_ORIGIN}:{}:{}: ", p.line, p.column);
                prop_assert!(p.to_string().starts_with(&prefix), "{p}");
            }
        }
    }
    Ok(())
}

proptest! {
    #![proptest_config(config(256))]

    #[test]
    fn facility_files_never_panic_and_every_error_is_located(bytes in input_from(samples_in("sample-rooms"))) {
        check_facility(&bytes)?;
    }
}

// ---------------------------------------------------------------------------
// Keymaps

const KEYS_ORIGIN: &str = "fuzz-keys.toml";

fn check_keymap(bytes: &[u8]) -> Result<(), TestCaseError> {
    let default_lines = line_count(include_bytes!("../keymaps/default.toml"));
    let results = [
        keymap_text(bytes, KEYS_ORIGIN).and_then(|t| Keymap::default_with_overrides(t, KEYS_ORIGIN)),
        keymap_text(bytes, KEYS_ORIGIN).and_then(|t| Keymap::from_toml(t, KEYS_ORIGIN)),
    ];
    for result in results {
        let Err(errors) = result else { continue };
        prop_assert!(!errors.0.is_empty());
        for e in &errors.0 {
            // A person's binding can make a built-in one unreachable: that error names the built-in line.
            let lines = match &*e.file {
                KEYS_ORIGIN => line_count(bytes),
                DEFAULT_KEYMAP_ORIGIN => default_lines,
                other => return Err(TestCaseError::fail(format!("error in an unknown file {other}: {e}"))),
            };
            prop_assert!((1..=lines).contains(&e.line), "line {} of {lines}: {e}", e.line);
            prop_assert!(!e.reason.trim().is_empty(), "{e:?}");
        }
    }
    Ok(())
}

proptest! {
    #![proptest_config(config(256))]

    #[test]
    fn keymaps_never_panic_and_every_error_is_located(bytes in input_from(samples_in("keymaps"))) {
        check_keymap(&bytes)?;
    }
}

// ---------------------------------------------------------------------------
// Records (the JSON of one journal, sync or export line)

/// Records of every kind from a generated history on a sample room.
fn sample_records() -> Vec<Record> {
    let room = Facility::load(&Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-rooms/harbourside-holding.toml"))
        .expect("sample room");
    let now = chrono::DateTime::parse_from_rfc3339("2026-12-01T07:40:00+01:00").unwrap();
    let history = tankwalk::demo::history(&room, DeviceId(ulid::Ulid::from_parts(7, 7)), now, 20, 3);
    let mut picked: Vec<Record> = Vec::new();
    for kind in ["reading", "event", "correction", "skip"] {
        picked.extend(history.iter().filter(|r| r.body.kind_name() == kind).take(6).cloned());
    }
    assert!(picked.len() >= 12, "the demo history has records of several kinds");
    picked
}

fn record_lines() -> Vec<Vec<u8>> {
    sample_records().iter().map(|r| serde_json::to_vec(r).unwrap()).collect()
}

/// A record line's error names its place within the line (the callers add
/// the file and line): the field, serde's column, the record and the field
/// that failed its check, or that the line is not an object at all.
fn record_error_is_located(message: &str, line: &[u8]) -> bool {
    if line.trim_ascii().is_empty() {
        // Nothing on the line: the line number the caller gives is the place.
        return !message.trim().is_empty();
    }
    if message.starts_with("field \"")
        || message.contains("field `")
        || message.contains(" (column ")
        || message.starts_with("expected a record")
    {
        return true;
    }
    let Some(rest) = message.strip_prefix("record ") else { return false };
    let Some((id, rest)) = rest.split_once(": ") else { return false };
    let Some((field, what)) = rest.split_once(": ") else { return false };
    id.len() == 26
        && !field.is_empty()
        && field.chars().all(|c| c.is_ascii_lowercase() || c == '.' || c == '_')
        && !what.trim().is_empty()
}

proptest! {
    #![proptest_config(config(256))]

    #[test]
    fn record_json_never_panics_and_every_error_is_located(bytes in input_from(record_lines())) {
        // A line never holds a newline: readers split on it.
        let bytes: Vec<u8> = bytes.into_iter().filter(|b| *b != b'\n').collect();
        match journal::parse_record(&bytes) {
            Ok(record) => {
                // Accepted: it stores and reads back exactly.
                let again = journal::parse_record(&serde_json::to_vec(&record).unwrap());
                prop_assert_eq!(again, Ok(record));
            }
            Err(message) => prop_assert!(record_error_is_located(&message, &bytes), "not located: {message}"),
        }
    }
}

// ---------------------------------------------------------------------------
// The journal

fn journal_bytes() -> Vec<u8> {
    let records = sample_records();
    let mut bytes = Header::new(records[0].device).to_line();
    for r in &records {
        bytes.extend(journal::record_line(&serde_json::to_vec(r).unwrap()));
    }
    bytes
}

proptest! {
    #![proptest_config(config(256))]

    /// Reading a damaged journal names every bad line by its number.
    #[test]
    fn journal_scan_never_panics_and_names_bad_lines(bytes in input_from(vec![journal_bytes()])) {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join(journal::FILE_NAME);
        std::fs::write(&path, &bytes).unwrap();
        let scan = journal::scan(&path, 0, 1).unwrap();
        let lines = line_count(&bytes) as u64;
        for bad in &scan.bad_lines {
            prop_assert!((2..=lines).contains(&bad.number), "line {} of {lines}", bad.number);
            prop_assert!(!bad.message.trim().is_empty());
        }
        if let Some(Err(message)) = &scan.header {
            prop_assert!(!message.trim().is_empty());
        }
        prop_assert!(scan.good_end() <= scan.len);
    }
}

proptest! {
    #![proptest_config(config(48))]

    /// Opening a data folder whose journal is damaged: either the store opens
    /// with every readable record and the damaged tail kept aside byte for
    /// byte, or it refuses, naming the journal's line.
    #[test]
    fn a_damaged_journal_opens_or_is_refused_at_its_line(bytes in input_from(vec![journal_bytes()])) {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join(journal::FILE_NAME);
        std::fs::write(&path, &bytes).unwrap();
        let scan = journal::scan(&path, 0, 1).unwrap();
        match SledStore::open(dir.path()) {
            Ok(store) => {
                let stored = store.len().unwrap();
                let readable = scan.records.iter().map(|l| l.record.id).collect::<std::collections::HashSet<_>>();
                prop_assert_eq!(stored, readable.len());
                for line in &scan.records {
                    prop_assert!(store.get(line.record.id).unwrap().is_some());
                }
                // Nothing is thrown away: the journal plus the piece set aside is the file as it was.
                let mut kept = std::fs::read(&path).unwrap();
                if let Some(aside) = &store.opened().set_aside {
                    kept.extend(std::fs::read(aside).unwrap());
                }
                if store.opened().created {
                    // The header was missing or unfinished: a fresh journal, the old bytes kept aside.
                    prop_assert!(kept.ends_with(&bytes));
                } else {
                    prop_assert_eq!(kept, bytes);
                }
            }
            Err(StoreError::Journal { path: p, line, message }) => {
                prop_assert_eq!(p, path);
                prop_assert!((1..=line_count(&bytes) as u64).contains(&line), "line {line}: {message}");
                prop_assert!(!message.trim().is_empty());
                // Refused: the journal is untouched.
                prop_assert_eq!(std::fs::read(dir.path().join(journal::FILE_NAME)).unwrap(), bytes);
            }
            Err(other) => return Err(TestCaseError::fail(format!("not located: {other}"))),
        }
    }
}

// ---------------------------------------------------------------------------
// Files given to `import` and read by `sync`: JSON Lines, the CSV, the manifest

/// An export of the sample records: records.jsonl, readings.csv, manifest.json.
struct ExportSample {
    jsonl: Vec<u8>,
    csv: Vec<u8>,
    manifest: Vec<u8>,
}

fn export_sample() -> &'static ExportSample {
    static SAMPLE: std::sync::OnceLock<ExportSample> = std::sync::OnceLock::new();
    SAMPLE.get_or_init(|| {
        let dir = tempfile::tempdir().unwrap();
        let mut store = SledStore::open(&dir.path().join("data")).unwrap();
        store.append(&sample_records()).unwrap();
        let out = dir.path().join("export");
        exchange::export(&store, &out, &exchange::ExportOptions::default(), &mut exchange::no_progress).unwrap();
        let read = |name: &str| std::fs::read(out.join(name)).unwrap();
        ExportSample {
            jsonl: read(exchange::export::RECORDS_FILE),
            csv: read(exchange::export::READINGS_FILE),
            manifest: read(exchange::manifest::FILE_NAME),
        }
    })
}

/// Each problem of a refused file names the file and a line of it; only
/// the note that more problems were not listed stands for the whole file.
fn check_problems(problems: &[exchange::Problem], files: &[(&Path, &[u8])]) -> Result<(), TestCaseError> {
    prop_assert!(!problems.is_empty());
    for p in problems {
        let Some((_, bytes)) = files.iter().find(|(path, _)| *path == p.path.as_path()) else {
            return Err(TestCaseError::fail(format!("a problem in a file not given: {p}")));
        };
        match p.line {
            Some(line) => prop_assert!((1..=line_count(bytes) as u64).contains(&line), "line {line}: {p}"),
            None => prop_assert!(p.message.starts_with("… and "), "not located: {p}"),
        }
        prop_assert!(!p.message.trim().is_empty());
    }
    Ok(())
}

proptest! {
    #![proptest_config(config(256))]

    /// A damaged records file (alone, as a sync segment is read) is refused
    /// line by line, or read whole.
    #[test]
    fn json_lines_files_never_panic_and_every_problem_is_located(bytes in input_from(vec![export_sample().jsonl.clone()])) {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join(exchange::export::RECORDS_FILE);
        std::fs::write(&path, &bytes).unwrap();
        if let Err(problems) = exchange::check::check_file_at(&path, chrono::Utc::now(), &mut exchange::no_progress) {
            check_problems(&problems, &[(&path, &bytes)])?;
        }
    }

    /// A damaged manifest beside an intact records file: refused at a line
    /// of the manifest, or its checksum checked.
    #[test]
    fn manifests_never_panic_and_every_problem_is_located(bytes in input_from(vec![export_sample().manifest.clone()])) {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join(exchange::export::RECORDS_FILE);
        let manifest = dir.path().join(exchange::manifest::FILE_NAME);
        std::fs::write(&path, &export_sample().jsonl).unwrap();
        std::fs::write(&manifest, &bytes).unwrap();
        if let Err(problems) = exchange::check::check_file_at(&path, chrono::Utc::now(), &mut exchange::no_progress) {
            check_problems(&problems, &[(&path, &export_sample().jsonl), (&manifest, &bytes)])?;
        }
    }

    /// The CSV is never imported (it is not lossless): named .csv it is
    /// refused pointing to the records file; renamed .jsonl it fails at line 1.
    #[test]
    fn csv_files_are_refused_at_line_one(bytes in input_from(vec![export_sample().csv.clone()]), renamed in any::<bool>()) {
        let dir = tempfile::tempdir().unwrap();
        let path = dir.path().join(if renamed { "readings.jsonl" } else { exchange::export::READINGS_FILE });
        std::fs::write(&path, &bytes).unwrap();
        let problems = exchange::check::check_file_at(&path, chrono::Utc::now(), &mut exchange::no_progress)
            .expect_err("a CSV is refused");
        check_problems(&problems, &[(&path, &bytes)])?;
        if !renamed {
            prop_assert!(problems[0].message.contains(exchange::export::RECORDS_FILE), "{}", problems[0]);
        }
    }
}

proptest! {
    #![proptest_config(config(32))]

    /// Importing a damaged file changes nothing in the store, byte for byte;
    /// importing it when it is whole adds exactly its records.
    #[test]
    fn a_damaged_import_changes_nothing(bytes in input_from(vec![export_sample().jsonl.clone()])) {
        let dir = tempfile::tempdir().unwrap();
        let data = dir.path().join("data");
        let path = dir.path().join(exchange::export::RECORDS_FILE);
        std::fs::write(&path, &bytes).unwrap();
        let mut store = SledStore::open(&data).unwrap();
        let conflicts = exchange::ConflictLog::in_data_dir(&data, store.device());
        let journal_before = std::fs::read(data.join(journal::FILE_NAME)).unwrap();
        let summary = exchange::import(&mut store, &conflicts, std::slice::from_ref(&path), &mut exchange::no_progress).unwrap();
        match &summary.files[0].result {
            Err(problems) => {
                check_problems(problems, &[(&path, &bytes)])?;
                prop_assert!(store.is_empty().unwrap());
                prop_assert_eq!(std::fs::read(data.join(journal::FILE_NAME)).unwrap(), journal_before);
            }
            Ok(applied) => prop_assert_eq!(store.len().unwrap(), applied.added),
        }
    }
}

// ---------------------------------------------------------------------------
// Numbers typed with their unit into the screen's fields

const FIELD_KINDS: [FieldKind; 13] = [
    FieldKind::TemperatureC,
    FieldKind::TemperatureF,
    FieldKind::Ph,
    FieldKind::TotalAmmonia(tankwalk::core::units::AmmoniaBasis::N),
    FieldKind::TotalAmmonia(tankwalk::core::units::AmmoniaBasis::Nh3),
    FieldKind::TotalAmmonia(tankwalk::core::units::AmmoniaBasis::Nh4),
    FieldKind::Nitrite,
    FieldKind::Nitrate,
    FieldKind::Salinity,
    FieldKind::DissolvedOxygen,
    FieldKind::WaterChangePercent,
    FieldKind::Count,
    FieldKind::Grams,
];

proptest! {
    #![proptest_config(config(256))]

    /// Whatever is typed, the field holds at most a short number; a value it
    /// accepts passes its quantity's check; a refusal says why, in the field.
    #[test]
    fn typed_numbers_never_panic_and_refusals_say_why(
        kind in prop::sample::select(FIELD_KINDS.to_vec()),
        keys in prop::collection::vec(prop_oneof![
            8 => prop::char::range('0', '9'),
            3 => prop::sample::select(vec!['.', ',', '-', '+', 'e', 'E', ' ', '°', 'C', 'F', '%', 'µ', '\u{0}', '\u{7f}']),
            1 => any::<char>(),
        ], 0..30),
        erase_every in 0usize..8,
    ) {
        let mut field = NumberField::new(kind);
        for (i, c) in keys.iter().enumerate() {
            if erase_every > 0 && i % (erase_every + 3) == 0 {
                field.erase();
            }
            field.type_char(*c);
            prop_assert!(field.text.chars().count() <= MAX_FIELD_CHARS);
            prop_assert!(field.text.chars().all(|c| c.is_ascii_digit() || c == '.'), "{:?}", field.text);
            if let Some(refused) = &field.refused {
                prop_assert!(!refused.trim().is_empty());
            }
            match &field.parsed {
                Parsed::Value(v, _) => prop_assert!(v.is_finite() && kind.check(*v).is_ok(), "{v}"),
                Parsed::Invalid(reason) => prop_assert!(!reason.trim().is_empty()),
                Parsed::Empty => prop_assert!(field.text.is_empty()),
            }
        }
    }

    /// Every quantity's check takes any number, NaN and infinities included.
    #[test]
    fn field_checks_take_any_number(kind in prop::sample::select(FIELD_KINDS.to_vec()), value in prop_oneof![
        any::<f64>(),
        Just(f64::NAN), Just(f64::INFINITY), Just(f64::NEG_INFINITY), Just(-0.0), Just(f64::MAX), Just(f64::MIN_POSITIVE),
    ]) {
        match kind.check(value) {
            Ok(_) => prop_assert!(value.is_finite(), "{value} accepted"),
            Err(reason) => prop_assert!(!reason.trim().is_empty()),
        }
    }
}

// ---------------------------------------------------------------------------
// Numbers with units on the command line (through the real binary)

#[cfg(unix)]
mod command_line {
    use super::*;

    /// A value for an option: mostly near a valid one, mutated; any bytes but
    /// NUL (which no command line can carry).
    fn option_value() -> impl Strategy<Value = Vec<u8>> {
        let valid = vec!["25", "7.4", "0.25", "78.5", "1.025", "2h", "2026-11-30T07:30", "ph=8,temp-c=24", "n"];
        let bytes = valid.iter().map(|v| v.as_bytes().to_vec()).collect();
        input_from(bytes).prop_map(|mut b| {
            b.retain(|c| *c != 0);
            b
        })
    }

    /// `--option=` followed by the bytes, as one argument.
    fn option_arg(option: &str, value: &[u8]) -> std::ffi::OsString {
        use std::os::unix::ffi::OsStringExt;
        let mut arg = format!("{option}=").into_bytes();
        arg.extend_from_slice(value);
        std::ffi::OsString::from_vec(arg)
    }

    const VALUE_OPTIONS: [&str; 10] = [
        "--temp-c",
        "--temp-f",
        "--ph",
        "--tan",
        "--nitrite",
        "--sg",
        "--do-mg-l",
        "--alkalinity",
        "--deaths",
        "--taken-at",
    ];

    proptest! {
        #![proptest_config(config(24))]

        /// `record` with one mangled value: saved, or refused with exit 2 and a
        /// message naming the option; never a panic (exit 101).
        #[test]
        fn record_options_refuse_bad_numbers_by_name(option in prop::sample::select(VALUE_OPTIONS.to_vec()), value in option_value()) {
            let data = tempfile::tempdir().unwrap();
            let mut args: Vec<std::ffi::OsString> =
                ["record", "--tank", "Q1", "--operator", "Fuzz"].iter().map(Into::into).collect();
            if option != "--ph" {
                args.extend(["--ph".into(), "7.2".into()]);
            }
            args.push(option_arg(option, &value));
            let out = std::process::Command::new(env!("CARGO_BIN_EXE_tankwalk"))
                .args(&args)
                .env_clear()
                .env("TANKWALK_DATA", data.path())
                .env("TZ", "UTC")
                .output()
                .unwrap();
            let stderr = String::from_utf8_lossy(&out.stderr);
            match out.status.code() {
                Some(0) => prop_assert!(String::from_utf8_lossy(&out.stdout).starts_with("saved ")),
                Some(2) => prop_assert!(stderr.contains(option), "{args:?}: the refusal does not name {option}: {stderr}"),
                other => return Err(TestCaseError::fail(format!("{args:?}: exit {other:?}: {stderr}"))),
            }
        }

        /// `calc --what-if` with a mangled list of changes: refused naming `--what-if`.
        #[test]
        fn calc_what_if_refuses_bad_changes_by_name(value in option_value()) {
            let arg = option_arg("--what-if", &value);
            let out = std::process::Command::new(env!("CARGO_BIN_EXE_tankwalk"))
                .args(["calc", "--temp-c", "25", "--ph", "7.5", "--tan", "1"])
                .arg(&arg)
                .env_clear()
                .output()
                .unwrap();
            let stderr = String::from_utf8_lossy(&out.stderr);
            match out.status.code() {
                Some(0) => {}
                Some(2) => prop_assert!(stderr.contains("--what-if"), "{arg:?}: {stderr}"),
                other => return Err(TestCaseError::fail(format!("{arg:?}: exit {other:?}: {stderr}"))),
            }
        }
    }
}

// ---------------------------------------------------------------------------
// Cases the fuzzing found, kept as regressions

/// A first use cut short between creating the journal and writing its header
/// left an empty file that made every later open fail ("File exists").
#[test]
fn an_empty_journal_left_by_a_cut_first_use_opens() {
    let dir = tempfile::tempdir().unwrap();
    std::fs::write(dir.path().join(journal::FILE_NAME), b"").unwrap();
    let store = SledStore::open(dir.path()).unwrap();
    assert!(store.opened().created);
    assert!(store.is_empty().unwrap());
}

/// Files that are not UTF-8 were refused without a line ("stream did not
/// contain valid UTF-8"); now the first bad byte is located.
#[test]
fn files_that_are_not_utf8_are_refused_at_the_bad_byte() {
    let room = b"[room]\nname = \"Caf\xe9 hall\"\n";
    let errors = Facility::check_bytes(room, Path::new(ROOM_ORIGIN), None).unwrap_err();
    assert_eq!(errors.to_string(), "fuzz-room.toml:2:12: not UTF-8 text (byte 0xe9); save the file as UTF-8");
    let keys = b"[board]\n\"\xff\" = \"quit\"\n";
    let errors = keymap_text(keys, KEYS_ORIGIN).unwrap_err();
    assert_eq!(errors.to_string(), "fuzz-keys.toml:2: column 2: not UTF-8 text (byte 0xff); save the file as UTF-8");
}

/// A manifest that is not UTF-8 stopped the import with "cannot read: stream
/// did not contain valid UTF-8" and no line; now the bad byte is located.
#[test]
fn a_manifest_that_is_not_utf8_is_refused_at_the_bad_byte() {
    let dir = tempfile::tempdir().unwrap();
    let path = dir.path().join(exchange::export::RECORDS_FILE);
    let manifest = dir.path().join(exchange::manifest::FILE_NAME);
    std::fs::write(&path, &export_sample().jsonl).unwrap();
    std::fs::write(&manifest, b"{\n  \"format\": \"caf\xe9\"\n}\n").unwrap();
    let problems = exchange::check::check_file_at(&path, chrono::Utc::now(), &mut exchange::no_progress).unwrap_err();
    assert_eq!(problems.len(), 1);
    assert_eq!((problems[0].path.as_path(), problems[0].line), (manifest.as_path(), Some(2)));
    assert!(problems[0].message.starts_with("column 17: not UTF-8 text (byte 0xe9)"), "{}", problems[0]);
}
