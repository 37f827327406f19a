//! `export`, `import` and `sync` through the built binary: malformed files,
//! spreadsheet safety, half-copied segments and the species edges in the CSV.

use std::fs;
use std::path::{Path, PathBuf};
use std::process::{Command, Output};

use chrono::{FixedOffset, TimeZone};
use serde_json::{Value, json};
use tankwalk::core::units::AmmoniaBasis;
use tankwalk::exchange::spreadsheet::COLUMNS;
use tankwalk::model::record::*;
use tankwalk::store::journal::Header;
use tankwalk::store::{SledStore, Store};

fn tw(dir: &Path, args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_tankwalk"))
        .args(args)
        .env_clear()
        .env("TANKWALK_DATA", dir)
        .env("TANKWALK_OPERATOR", "Ines Varga")
        .env("TZ", "UTC-1")
        .output()
        .expect("binary runs")
}

fn ok(dir: &Path, args: &[&str]) -> String {
    let out = tw(dir, args);
    assert!(out.status.success(), "{args:?}: {}", String::from_utf8_lossy(&out.stderr));
    String::from_utf8(out.stdout).unwrap()
}

fn log_json(dir: &Path) -> String {
    ok(dir, &["log", "--json", "--withdrawn"])
}

fn at(minutes: i64) -> chrono::DateTime<FixedOffset> {
    FixedOffset::east_opt(3600).unwrap().with_ymd_and_hms(2026, 12, 1, 7, 0, 0).unwrap()
        + chrono::Duration::minutes(minutes)
}

fn reading(tank: &str, minutes: i64, ph: f64, note: Option<&str>) -> Record {
    let mut r = Reading::new(Target::Tank(tank.into()));
    r.measurements.temperature = Some(Temperature::celsius(25.0));
    r.measurements.ph = Some(ph);
    r.measurements.total_ammonia = Some(TotalAmmonia { value: 1.0, basis: AmmoniaBasis::N });
    r.note = note.map(str::to_string);
    Record::new(DeviceId::generate(), "Ines Varga", at(minutes), RecordBody::Reading(r))
}

/// Saves records into the data folder `dir` through the library.
fn save(dir: &Path, records: &[Record]) {
    let mut store = SledStore::open(dir).unwrap();
    store.append(records).unwrap();
}

fn line(value: &Value) -> String {
    format!("{value}\n")
}

fn header_line() -> String {
    String::from_utf8(Header::new(DeviceId::generate()).to_line()).unwrap()
}

fn record_value(r: &Record) -> Value {
    serde_json::to_value(r).unwrap()
}

/// One malformed input: the file(s) to write, and what the error must say.
struct Case {
    name: &'static str,
    /// File name and content of the file imported (first), and any others beside it.
    files: Vec<(&'static str, Vec<u8>)>,
    /// The file named in the message, and the line.
    at: (&'static str, u64),
    /// A piece of the message.
    says: &'static str,
}

fn cases(stored: &Record) -> Vec<Case> {
    let h = header_line();
    let good = line(&record_value(&reading("Q-01", 1, 7.1, None)));
    let with = |tweak: &dyn Fn(&mut Value)| {
        let mut v = record_value(&reading("Q-02", 2, 7.2, None));
        tweak(&mut v);
        line(&v)
    };
    let file = |parts: &[&str]| parts.concat().into_bytes();
    let mut cases = vec![
        Case {
            name: "empty file",
            files: vec![("r.jsonl", Vec::new())],
            at: ("r.jsonl", 1),
            says: "the file is empty",
        },
        Case {
            name: "truncated last line",
            files: vec![("r.jsonl", file(&[&h, &good, &good[..good.len() / 2]]))],
            at: ("r.jsonl", 3),
            says: "cut short",
        },
        Case {
            name: "bad JSON",
            files: vec![("r.jsonl", file(&[&h, &good, "{\"id\": oops}\n"]))],
            at: ("r.jsonl", 3),
            says: "column",
        },
        Case {
            name: "wrong version",
            files: vec![("r.jsonl", file(&[&h.replace("\"version\":1", "\"version\":2"), &good]))],
            at: ("r.jsonl", 1),
            says: "newer than this tankwalk reads",
        },
        Case {
            name: "another format",
            files: vec![("r.jsonl", file(&[&h.replace("tankwalk-records", "fishlog"), &good]))],
            at: ("r.jsonl", 1),
            says: "not a tankwalk records file",
        },
        Case {
            name: "unknown kind",
            files: vec![("r.jsonl", file(&[&h, &good, &with(&|v| v["body"]["kind"] = json!("flood"))]))],
            at: ("r.jsonl", 3),
            says: "unknown variant `flood`",
        },
        Case {
            name: "bad date",
            files: vec![("r.jsonl", file(&[&h, &good, &with(&|v| v["taken_at"] = json!("2026-13-45T07:00:00Z"))]))],
            at: ("r.jsonl", 3),
            says: "taken_at",
        },
        Case {
            name: "out-of-range value",
            files: vec![("r.jsonl", file(&[&h, &good, &with(&|v| v["body"]["measurements"]["ph"] = json!(15.2))]))],
            at: ("r.jsonl", 3),
            says: "ph",
        },
        Case {
            name: "a number too large for any value",
            files: vec![("r.jsonl", file(&[&h, &good, &with(&|v| v["body"]["measurements"]["ph"] = json!(1e300))]))],
            at: ("r.jsonl", 3),
            says: "outside the allowed range",
        },
        Case {
            name: "duplicate id with other content",
            files: vec![("r.jsonl", file(&[&h, &good, &good.replace("Q-01", "Q-09")]))],
            at: ("r.jsonl", 3),
            says: "also on line 2, with different content",
        },
        Case {
            name: "binary garbage",
            files: vec![("r.jsonl", (0..4096u32).map(|i| (i.wrapping_mul(2_654_435_761) >> 13) as u8).collect())],
            at: ("r.jsonl", 1),
            says: "not a tankwalk records file",
        },
        Case {
            name: "a 100 MB line",
            files: vec![("r.jsonl", {
                let mut bytes = file(&[&h, "{\"note\":\""]);
                bytes.resize(bytes.len() + 100 * 1024 * 1024, b'a');
                bytes.extend_from_slice(b"\"}\n");
                bytes
            })],
            at: ("r.jsonl", 2),
            says: "more than any record can be",
        },
        Case {
            name: "unknown field",
            files: vec![("r.jsonl", file(&[&h, &good, &with(&|v| v["body"]["colour"] = json!("green"))]))],
            at: ("r.jsonl", 3),
            says: "unknown field `colour`",
        },
        Case {
            name: "missing field",
            files: vec![(
                "r.jsonl",
                file(&[&h, &good, &with(&|v| drop(v.as_object_mut().unwrap().remove("operator")))]),
            )],
            at: ("r.jsonl", 3),
            says: "missing field `operator`",
        },
        Case {
            name: "blank line",
            files: vec![("r.jsonl", file(&[&h, "\n", &good]))],
            at: ("r.jsonl", 2),
            says: "empty line",
        },
        Case {
            name: "not an id",
            files: vec![("r.jsonl", file(&[&h, &good, &with(&|v| v["id"] = json!("not-an-id"))]))],
            at: ("r.jsonl", 3),
            says: "\"id\"",
        },
        Case {
            name: "blank operator",
            files: vec![("r.jsonl", file(&[&h, &good, &with(&|v| v["operator"] = json!("   "))]))],
            at: ("r.jsonl", 3),
            says: "operator",
        },
        Case {
            name: "nothing measured",
            files: vec![("r.jsonl", file(&[&h, &good, &with(&|v| v["body"]["measurements"] = json!({}))]))],
            at: ("r.jsonl", 3),
            says: "nothing was measured",
        },
        Case {
            name: "negative death count",
            files: vec![("r.jsonl", file(&[&h, &good, &with(&|v| v["body"]["observations"]["deaths"] = json!(-1))]))],
            at: ("r.jsonl", 3),
            says: "deaths",
        },
        Case {
            name: "control character in a tank id",
            files: vec![("r.jsonl", file(&[&h, &good, &with(&|v| v["body"]["target"] = json!({"tank": "Q\u{7}1"}))]))],
            at: ("r.jsonl", 3),
            says: "control character",
        },
        Case {
            name: "a correction replaced by a correction",
            files: vec![(
                "r.jsonl",
                file(&[
                    &h,
                    &good,
                    &with(&|v| {
                        v["body"] = json!({"kind": "correction", "supersedes": stored.id, "reason": "x",
                        "replacement": {"kind": "correction", "supersedes": stored.id, "replacement": null, "reason": "y"}});
                    }),
                ]),
            )],
            at: ("r.jsonl", 3),
            says: "replacement",
        },
        Case {
            name: "an array instead of a record",
            files: vec![("r.jsonl", file(&[&h, &good, "[1, 2, 3]\n"]))],
            at: ("r.jsonl", 3),
            says: "expected a record (a JSON object), found an array",
        },
        Case {
            name: "a header without its device",
            files: vec![(
                "r.jsonl",
                file(&[
                    "{\"format\":\"tankwalk-records\",\"version\":1,\"created_at\":\"2026-12-01T06:00:00Z\"}\n",
                    &good,
                ]),
            )],
            at: ("r.jsonl", 1),
            says: "missing field `device`",
        },
        Case {
            name: "two bad lines, both named",
            files: vec![("r.jsonl", file(&[&h, &good, "{\n", &good.replace("Q-01", "Q-03"), "}\n"]))],
            at: ("r.jsonl", 5),
            says: "",
        },
        Case {
            name: "the spreadsheet export",
            files: vec![("readings.csv", b"\xef\xbb\xbfid,taken_at,tank\r\n01J,2026-12-01,Q-01\r\n".to_vec())],
            at: ("readings.csv", 1),
            says: "import the lossless records file",
        },
        Case {
            name: "CSV content under a JSON Lines name",
            files: vec![("r.jsonl", b"id,taken_at,tank\n01J,2026-12-01,Q-01\n".to_vec())],
            at: ("r.jsonl", 1),
            says: "spreadsheet (CSV) export",
        },
    ];
    // Checksums: a manifest beside the file that does not match it.
    let body = file(&[&h, &good]);
    // Written out by hand so that the line of the file's entry is known: line 8.
    let manifest = |sha: &str, bytes: usize, count: u64| {
        format!(
            "{{\n  \"format\": \"tankwalk-export\",\n  \"version\": 1,\n  \"device\": \"{}\",\n  \
             \"created_at\": \"2026-12-01T08:00:00Z\",\n  \"files\": [\n    {{\n      \"name\": \"records.jsonl\",\n      \
             \"content\": \"records\",\n      \"bytes\": {bytes},\n      \"sha256\": \"{sha}\",\n      \"count\": {count}\n    \
             }}\n  ]\n}}\n",
            DeviceId::generate()
        )
        .into_bytes()
    };
    let sha = tankwalk::exchange::sha256_hex(&body);
    cases.push(Case {
        name: "checksum mismatch",
        files: vec![("records.jsonl", body.clone()), ("manifest.json", manifest(&"0".repeat(64), body.len(), 1))],
        at: ("manifest.json", 8),
        says: "checksum mismatch",
    });
    cases.push(Case {
        name: "shorter than the manifest says",
        files: vec![("records.jsonl", body.clone()), ("manifest.json", manifest(&sha, body.len() + 10, 1))],
        at: ("manifest.json", 8),
        says: "bytes",
    });
    cases.push(Case {
        name: "an unreadable manifest",
        files: vec![
            ("records.jsonl", body.clone()),
            ("manifest.json", b"{\n  \"format\": \"tankwalk-export\",\n  oops\n}".to_vec()),
        ],
        at: ("manifest.json", 3),
        says: "",
    });
    // A sync segment whose header announces more than is there.
    let mut segment = Header::new(DeviceId::generate());
    segment.segment = Some(1);
    segment.records = Some(2);
    segment.body_bytes = Some(good.len() as u64 * 2);
    segment.body_sha256 = Some("0".repeat(64));
    cases.push(Case {
        name: "a segment cut short",
        files: vec![("segment-000001.jsonl", [segment.to_line(), good.clone().into_bytes()].concat())],
        at: ("segment-000001.jsonl", 1),
        says: "incomplete",
    });
    cases
}

#[test]
fn every_malformed_file_is_named_by_file_and_line_and_changes_nothing() {
    let data = tempfile::tempdir().unwrap();
    let dir = data.path();
    let stored = reading("B2-07", 0, 7.8, Some("before the import"));
    save(dir, std::slice::from_ref(&stored));
    let before = log_json(dir);
    // Nothing is saved that is not in the journal first: it must stay byte for byte the same.
    let journal = fs::read(dir.join("journal.jsonl")).unwrap();
    let cases = cases(&stored);
    assert!(cases.len() >= 20);
    for case in cases {
        let started = std::time::Instant::now();
        let work = tempfile::tempdir().unwrap();
        for (name, bytes) in &case.files {
            fs::write(work.path().join(name), bytes).unwrap();
        }
        let imported = work.path().join(case.files[0].0);
        let out = tw(dir, &["import", imported.to_str().unwrap()]);
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{}: {stderr}", case.name);
        let located = format!("{}:{}: ", work.path().join(case.at.0).display(), case.at.1);
        let message = stderr.lines().find(|l| l.contains(&located)).unwrap_or_else(|| {
            panic!("{}: no message at {located} in:\n{stderr}", case.name);
        });
        assert!(message.contains(case.says), "{}: {message}", case.name);
        eprintln!("{:<40} {}", case.name, message.trim());
        assert_eq!(fs::read(dir.join("journal.jsonl")).unwrap(), journal, "{}: the journal changed", case.name);
        assert!(stderr.contains("nothing of it was saved"), "{}: {stderr}", case.name);
        eprintln!("    ({} ms)", started.elapsed().as_millis());
    }
    assert!(!dir.join("conflicts.jsonl").exists());
    assert_eq!(log_json(dir), before, "the store's content changed");
}

#[test]
fn a_conflict_keeps_the_stored_version_and_sets_the_other_aside() {
    let data = tempfile::tempdir().unwrap();
    let dir = data.path();
    let stored = reading("B2-07", 0, 7.8, None);
    save(dir, std::slice::from_ref(&stored));
    let before = log_json(dir);
    let mut other = record_value(&stored);
    other["body"]["measurements"]["ph"] = json!(6.9);
    let work = tempfile::tempdir().unwrap();
    let file = work.path().join("edited.jsonl");
    fs::write(&file, [header_line(), line(&other)].concat()).unwrap();
    let out = tw(dir, &["import", file.to_str().unwrap()]);
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert_eq!(out.status.code(), Some(1), "{stderr}");
    assert!(
        stderr.contains(&format!(
            "{}:2: record {} is already stored with different content",
            file.display(),
            stored.id
        )),
        "{stderr}"
    );
    assert!(stderr.contains("body.measurements.ph"), "{stderr}");
    // The stored version stays as it was; `log` shows the other version beside it.
    let mut after: Value = serde_json::from_str(&log_json(dir)).unwrap();
    assert_eq!(after[0]["conflicts"][0]["body"]["measurements"]["ph"], json!(6.9));
    after[0].as_object_mut().unwrap().remove("conflicts");
    assert_eq!(after, serde_json::from_str::<Value>(&before).unwrap(), "the stored version stays as it was");
    assert!(ok(dir, &["log"]).contains("conflict: another laptop's version"));
    // The incoming version is kept, once, however often it comes.
    tw(dir, &["import", file.to_str().unwrap()]);
    let kept = fs::read_to_string(dir.join("conflicts.jsonl")).unwrap();
    assert_eq!(kept.lines().count(), 2, "{kept}");
    let doctor = ok(dir, &["doctor"]);
    assert!(doctor.contains(&stored.id.to_string()) && doctor.contains("conflict"), "{doctor}");
    let report: Value = serde_json::from_str(&ok(dir, &["doctor", "--json"])).unwrap();
    assert_eq!(report["conflicts"][0]["id"], json!(stored.id));
}

#[test]
fn no_cell_of_the_csv_runs_as_a_formula() {
    let data = tempfile::tempdir().unwrap();
    let dir = data.path();
    let dangerous = ["=1+2", "+1", "-1", "@SUM(A1:A9)", "\tpad", "\nnew line", "=cmd|' /C calc'!A0"];
    let mut records: Vec<Record> =
        dangerous.iter().enumerate().map(|(i, n)| reading("Q-01", i as i64, 7.0, Some(n))).collect();
    let mut by_name = reading("-5", 20, 7.5, None);
    by_name.operator = "=HYPERLINK(\"http://example.invalid\")".into();
    records.push(by_name);
    save(dir, &records);
    let out = tempfile::tempdir().unwrap();
    ok(dir, &["export", "--out", out.path().to_str().unwrap(), "--format", "csv"]);
    let bytes = fs::read(out.path().join("readings.csv")).unwrap();
    assert!(bytes.starts_with("\u{feff}id,".as_bytes()), "UTF-8 with a byte-order mark");
    assert!(bytes.windows(2).filter(|w| w == b"\r\n").count() > records.len(), "RFC 4180 line ends");
    let mut reader = csv::ReaderBuilder::new().from_reader(&bytes[3..]);
    assert_eq!(reader.headers().unwrap().iter().collect::<Vec<_>>(), COLUMNS);
    let rows: Vec<csv::StringRecord> = reader.records().map(Result::unwrap).collect();
    assert_eq!(rows.len(), records.len());
    let column = |name: &str| COLUMNS.iter().position(|c| *c == name).unwrap();
    let numbers = ["temp_c", "ph", "tan_n_mg_l", "nh3_n_mg_l", "nh3_mg_l", "nh3_fraction", "deaths"];
    for row in &rows {
        for (i, cell) in row.iter().enumerate() {
            if numbers.contains(&COLUMNS[i]) {
                cell.parse::<f64>().unwrap_or_else(|_| panic!("{} is a number: {cell:?}", COLUMNS[i]));
            } else if let Some(first) = cell.chars().next() {
                assert!(!"=+-@\t\r\n".contains(first), "{} would run as a formula: {cell:?}", COLUMNS[i]);
            }
        }
    }
    let notes: Vec<&str> = rows.iter().map(|r| &r[column("note")]).collect();
    for n in dangerous {
        assert!(notes.contains(&format!("'{n}").as_str()), "{n:?} is kept, as text, in {notes:?}");
    }
    let row = rows.iter().find(|r| &r[column("tank")] == "'-5").expect("a tank id starting with - is text");
    assert_eq!(&row[column("operator")], "'=HYPERLINK(\"http://example.invalid\")");
}

#[test]
fn the_csv_uses_the_species_edges_of_the_room() {
    let data = tempfile::tempdir().unwrap();
    let dir = data.path();
    // 25 °C, pH 7.5, 1 mg TAN-N/L: NH3-N ≈ 0.0177 mg/L (Emerson et al. 1975: pKa 9.245 at 25 °C).
    let mut r = reading("B-01", 0, 7.5, None);
    r.device = DeviceId::generate();
    save(dir, &[r]);
    let room = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("sample-rooms/harbourside-holding.toml");
    let band = |args: &[&str]| {
        let out = tempfile::tempdir().unwrap();
        let mut all = vec!["export", "--out", out.path().to_str().unwrap(), "--format", "csv"];
        all.extend_from_slice(args);
        let stdout = ok(dir, &all);
        let bytes = fs::read(out.path().join("readings.csv")).unwrap();
        let mut reader = csv::Reader::from_reader(&bytes[3..]);
        let row = reader.records().next().unwrap().unwrap();
        let at = |name: &str| row[COLUMNS.iter().position(|c| *c == name).unwrap()].to_string();
        let nh3: f64 = at("nh3_n_mg_l").parse().unwrap();
        assert!((nh3 - 0.0177).abs() < 0.0005, "{nh3}");
        (at("band"), at("band_edges"), at("system"), stdout)
    };
    let (plain, edges, _, stdout) = band(&[]);
    assert_eq!((plain.as_str(), edges.as_str()), ("clear", "tankwalk defaults (no room given)"));
    assert!(stdout.contains("default NH3 edges"), "{stdout}");
    // The neon profile's watch edge is 0.015 mg NH3-N/L (the room file).
    let (with_room, edges, system, stdout) = band(&["--room", room.to_str().unwrap()]);
    assert_eq!(with_room, "watch");
    assert_eq!(edges, "species profile 'neon'");
    assert_eq!(system, "RACK-B");
    assert!(!stdout.contains("default NH3 edges"), "{stdout}");
}

#[test]
fn export_then_import_on_another_laptop_from_the_command_line() {
    let (a, b) = (tempfile::tempdir().unwrap(), tempfile::tempdir().unwrap());
    ok(a.path(), &["record", "--tank", "B2-07", "--temp-c", "25", "--ph", "8.0", "--tan", "1.0"]);
    ok(a.path(), &["event", "--tank", "B2-07", "water-change", "--percent", "30", "--dechlorinated"]);
    let out = tempfile::tempdir().unwrap();
    let export = out.path().join("monday");
    let text = ok(a.path(), &["export", "--out", export.to_str().unwrap()]);
    assert!(text.contains("exported 2 records (1 reading, 1 event, 0 corrections, 0 skips)"), "{text}");
    let summary: Value =
        serde_json::from_str(&ok(a.path(), &["export", "--out", export.to_str().unwrap(), "--json"])).unwrap();
    assert_eq!(summary["records"], 2);
    assert_eq!(summary["rows"], 1);
    let file = export.join("records.jsonl");
    let text = ok(b.path(), &["import", file.to_str().unwrap()]);
    assert!(text.contains("2 records: 2 added, 0 already here (checksum checked against"), "{text}");
    let text = ok(b.path(), &["import", file.to_str().unwrap()]);
    assert!(text.contains("0 added, 2 already here"), "{text}");
    let strip = |log: String| -> Vec<Value> {
        let mut v: Vec<Value> = serde_json::from_str(&log).unwrap();
        v.sort_by_key(|e| e["id"].to_string());
        v
    };
    assert_eq!(strip(log_json(a.path())), strip(log_json(b.path())));
}

/// Copies `from` to `to` the way a slow file mover does: `bytes` of it so far.
fn copy_part(from: &Path, to: &Path, bytes: usize) {
    let all = fs::read(from).unwrap();
    fs::create_dir_all(to.parent().unwrap()).unwrap();
    fs::write(to, &all[..bytes.min(all.len())]).unwrap();
}

#[test]
fn a_half_copied_segment_is_left_for_the_next_run() {
    let (a, b) = (tempfile::tempdir().unwrap(), tempfile::tempdir().unwrap());
    let shared_a = tempfile::tempdir().unwrap();
    let records: Vec<Record> = (0..40).map(|i| reading("Q-01", i, 7.0 + i as f64 / 100.0, None)).collect();
    save(a.path(), &records);
    ok(a.path(), &["sync", shared_a.path().to_str().unwrap()]);
    let device_dir = fs::read_dir(shared_a.path()).unwrap().next().unwrap().unwrap();
    let segment = device_dir.path().join("segment-000001.jsonl");
    let len = fs::metadata(&segment).unwrap().len() as usize;

    // Laptop B sees the shared folder through a file mover that has copied part of the segment.
    let shared_b = tempfile::tempdir().unwrap();
    let there = shared_b.path().join(device_dir.file_name()).join("segment-000001.jsonl");
    let before = log_json(b.path());
    for part in [0, 40, len / 2, len - 1] {
        copy_part(&segment, &there, part);
        let out = tw(b.path(), &["sync", shared_b.path().to_str().unwrap()]);
        let stdout = String::from_utf8_lossy(&out.stdout);
        assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
        assert!(stdout.contains("waiting:") && stdout.contains("incomplete"), "{part} bytes: {stdout}");
        assert_eq!(log_json(b.path()), before, "nothing of a half segment is applied");
    }
    // The same length but damaged: left too, and said so.
    let mut damaged = fs::read(&segment).unwrap();
    damaged[len - 10] = b'#';
    fs::write(&there, &damaged).unwrap();
    let out = tw(b.path(), &["sync", shared_b.path().to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stderr).contains("damaged"), "{}", String::from_utf8_lossy(&out.stderr));
    assert_eq!(log_json(b.path()), before);
    // Once the copy is whole, the next run takes it in.
    copy_part(&segment, &there, len);
    let stdout = ok(b.path(), &["sync", shared_b.path().to_str().unwrap()]);
    assert!(stdout.contains("received 40 records from 1 laptop (1 segment): 40 new"), "{stdout}");
    let stdout = ok(b.path(), &["sync", shared_b.path().to_str().unwrap()]);
    assert!(stdout.contains("nothing new to receive"), "{stdout}");
}

#[test]
fn sync_needs_the_shared_folder_to_exist() {
    let a = tempfile::tempdir().unwrap();
    let missing = a.path().join("not-mounted");
    let out = tw(a.path(), &["sync", missing.to_str().unwrap()]);
    assert_eq!(out.status.code(), Some(1));
    assert!(String::from_utf8_lossy(&out.stderr).contains("is the network folder or USB stick mounted"));
    assert!(!missing.exists(), "a missing shared folder is not created");
}

#[test]
fn the_shared_folder_is_remembered_for_later_syncs() {
    let a = tempfile::tempdir().unwrap();
    let b = tempfile::tempdir().unwrap();
    let shared = tempfile::tempdir().unwrap();
    let out = tw(a.path(), &["sync"]);
    assert_eq!(out.status.code(), Some(2), "no folder given or remembered");
    assert!(String::from_utf8_lossy(&out.stderr).contains("run `tankwalk sync DIR` once"));
    save(a.path(), &[reading("T-1", 0, 7.2, None)]);
    save(b.path(), &[reading("T-2", 5, 7.4, None)]);
    let folder = shared.path().to_str().unwrap();
    ok(a.path(), &["sync", folder]);
    ok(b.path(), &["sync", folder]);
    // Laptop A syncs again without naming the folder, and receives B's reading.
    let said = ok(a.path(), &["sync"]);
    assert!(said.contains("received 1 record"), "{said}");
    assert_eq!(serde_json::from_str::<Value>(&log_json(a.path())).unwrap().as_array().unwrap().len(), 2);
}
