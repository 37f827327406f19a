//! `record`, `event`, `correct`, `log`, `doctor` and `rebuild` through the
//! built binary, as a script would use them.

use std::fs;
use std::path::Path;
use std::process::{Command, Output};

use serde_json::Value;
use tankwalk::model::record::{Reading, Record, RecordBody, Target};
use tankwalk::store::{SledStore, Store};

/// Runs the binary on data folder `dir`, in a fixed time zone (UTC+1, a POSIX
/// zone string needing no zone database) with a known operator.
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

fn json(dir: &Path, args: &[&str]) -> Value {
    let mut all = args.to_vec();
    all.push("--json");
    serde_json::from_str(&ok(dir, &all)).expect("JSON")
}

/// The id printed by a text-mode save: `saved <id> (...)`.
fn saved_id(stdout: &str) -> String {
    let first = stdout.lines().next().unwrap_or_default();
    let id = first.strip_prefix("saved ").and_then(|rest| rest.split_whitespace().next());
    id.unwrap_or_else(|| panic!("no id in {stdout:?}")).to_string()
}

fn close(value: &Value, key: &str, expected: f64, tol_rel: f64) {
    let got = value[key].as_f64().unwrap_or_else(|| panic!("{key} missing in {value}"));
    assert!((got - expected).abs() <= tol_rel * expected.abs(), "{key}: {got} vs {expected}");
}

#[test]
fn record_then_log_from_a_script() {
    let data = tempfile::tempdir().unwrap();
    let dir = data.path();
    let a = saved_id(&ok(
        dir,
        &[
            "record",
            "--tank",
            "B2-07",
            "--temp-c",
            "25",
            "--ph",
            "8.0",
            "--tan",
            "1.0",
            "--taken-at",
            "2026-11-30 07:30",
        ],
    ));
    let b = saved_id(&ok(
        dir,
        &[
            "record",
            "--system",
            "RACK-B",
            "--temp-c",
            "24",
            "--ph",
            "7.2",
            "--tan",
            "0.4",
            "--taken-at",
            "2026-11-30 07:45",
        ],
    ));
    let c = saved_id(&ok(
        dir,
        &[
            "record",
            "--tank",
            "B2-07",
            "--temp-f",
            "77",
            "--ph",
            "8.0",
            "--tan",
            "1.2158920539730134",
            "--tan-as",
            "nh3",
            "--observe",
            "gasping,cloudy-eyes",
            "--deaths",
            "2",
            "--note",
            "two dead at the back",
            "--taken-at",
            "2026-12-01 07:30",
        ],
    ));
    let e = saved_id(&ok(
        dir,
        &[
            "event",
            "--tank",
            "B2-07",
            "water-change",
            "--percent",
            "30",
            "--source-ph",
            "7.4",
            "--dechlorinated",
            "--taken-at",
            "2026-12-01 08:00",
        ],
    ));
    let other = saved_id(&ok(dir, &["record", "--tank", "B2-08", "--ph", "7.0", "--taken-at", "2026-12-01 07:35"]));

    let log = json(dir, &["log"]);
    let ids: Vec<&str> = log.as_array().unwrap().iter().map(|v| v["id"].as_str().unwrap()).collect();
    assert_eq!(ids, [e.as_str(), &other, &c, &b, &a], "every record, newest first");

    let tank = json(dir, &["log", "--tank", "B2-07"]);
    let ids: Vec<&str> = tank.as_array().unwrap().iter().map(|v| v["id"].as_str().unwrap()).collect();
    assert_eq!(ids, [e.as_str(), &c, &a]);
    let with_system = json(dir, &["log", "--tank", "B2-07", "--system", "RACK-B"]);
    assert_eq!(with_system.as_array().unwrap().len(), 4, "the system's reading is found from its tank");

    let v = &tank[1];
    for key in
        ["id", "kind", "tank", "system", "taken_at", "temp_c", "ph", "tan_n_mg_l", "nh3_mg_l", "band", "supersedes"]
    {
        assert!(v.get(key).is_some(), "{key} missing in {v}");
    }
    assert_eq!(v["kind"], "reading");
    assert_eq!(v["tank"], "B2-07");
    assert_eq!(v["taken_at"], "2026-12-01T07:30:00+01:00", "the local offset it was taken at");
    assert!(v["supersedes"].is_null());
    // 77 °F = 25 °C exactly; 1.21589 mg/L as NH3 = 1 mg TAN-N/L (IUPAC atomic weights).
    close(v, "temp_c", 25.0, 1e-12);
    close(v, "tan_n_mg_l", 1.0, 1e-12);
    // Reference row UNITS-013: 1 mg TAN-N/L at pH 8.0, 25 °C → 0.06524760874489856 mg NH3/L
    // (Emerson et al. 1975; IUPAC atomic weights).
    close(v, "nh3_mg_l", 0.06524760874489856, 1e-9);
    assert_eq!(v["band"], "act");
    assert_eq!(v["signs"], serde_json::json!(["gasping", "cloudy-eyes"]));
    assert_eq!(v["deaths"], 2);
    assert_eq!(v["note"], "two dead at the back");
    // Stored as entered: the °F value and the kit basis.
    assert_eq!(v["measurements"]["temperature"], serde_json::json!({"value": 77.0, "unit": "f"}));
    assert_eq!(v["measurements"]["total_ammonia"]["as"], "nh3");

    let ev = &tank[0];
    assert_eq!(ev["kind"], "event");
    assert_eq!(ev["event"]["type"], "water_change");
    assert_eq!(ev["event"]["percent"], 30.0);
    assert!(ev["nh3_mg_l"].is_null());

    // Windows of time: a date means its whole day.
    let day = json(dir, &["log", "--since", "2026-12-01", "--until", "2026-12-01"]);
    assert_eq!(day.as_array().unwrap().len(), 3);
    let before = json(dir, &["log", "--until", "2026-11-30T07:40"]);
    assert_eq!(before.as_array().unwrap().len(), 1);
    let readings = json(dir, &["log", "--kind", "reading", "--limit", "2"]);
    assert_eq!(readings.as_array().unwrap().len(), 2);

    // The text form names the records and their bands.
    let text = ok(dir, &["log", "--tank", "B2-07"]);
    for needle in [a.as_str(), &c, &e, "◆ act", "water change 30 %", "note: two dead at the back"] {
        assert!(text.contains(needle), "missing {needle:?} in\n{text}");
    }
}

#[test]
fn record_prints_the_id_nh3_band_and_caution() {
    let data = tempfile::tempdir().unwrap();
    let out = ok(data.path(), &["record", "--tank", "Q1", "--temp-c", "25", "--ph", "8.0", "--tan", "1.0"]);
    for needle in ["saved ", "tank Q1", "NH3 0.0652 mg/L", "0.0537 mg/L NH3-N", "◆ act", "not veterinary advice"] {
        assert!(out.contains(needle), "missing {needle:?} in\n{out}");
    }
    let v = json(data.path(), &["record", "--tank", "Q1", "--ph", "6.8", "--nitrate", "40", "--nitrate-as", "ion"]);
    assert!(v["id"].as_str().unwrap().len() == 26);
    assert!(v["nh3_mg_l"].is_null() && v["band"].is_null(), "no NH3 without temperature and ammonia");
    // 40 mg NO3-/L × 14.007/62.004 = 9.036 mg NO3-N/L (IUPAC atomic weights).
    close(&v, "nitrate_n_mg_l", 40.0 * 14.007 / 62.004, 1e-9);
    assert!(v["caution"].as_str().unwrap().contains("not veterinary advice"));
    let warned = json(data.path(), &["record", "--tank", "Q1", "--ph", "4.6"]);
    assert!(warned["warnings"][0].as_str().unwrap().starts_with("--ph: pH 4.6 is unusual"), "{warned}");
}

#[test]
fn every_event_kind_from_the_command_line() {
    let data = tempfile::tempdir().unwrap();
    let dir = data.path();
    let cases: &[(&[&str], &str)] = &[
        (
            &[
                "water-change",
                "--percent",
                "40",
                "--source-tan",
                "0.1",
                "--source-temp-f",
                "75.2",
                "--not-dechlorinated",
            ],
            "water_change",
        ),
        (&["feeding-held"], "feeding_held"),
        (&["feeding-resumed"], "feeding_resumed"),
        (&["medication", "--class", "antibiotic", "--name", "oxytetracycline"], "medication"),
        (&["filter-cleaned", "--rinsed-in-tap-water"], "filter_cleaned"),
        (&["substrate-replaced"], "substrate_replaced"),
        (&["fish-added", "--count", "24"], "fish_added"),
        (&["dead-fish-removed", "--count", "3"], "dead_fish_removed"),
        (&["salt-added", "--grams", "450"], "salt_added"),
        (&["heater-set-point", "--temp-c", "23"], "heater_set_point"),
        (&["nitrifying-culture-added"], "nitrifying_culture_added"),
        (&["ammonia-binder-added"], "ammonia_binder_added"),
        (&["zeolite-added", "--note", "one bag in the sump"], "zeolite_added"),
    ];
    for (kind_args, kind) in cases {
        let mut args = vec!["event", "--system", "RACK-C"];
        args.extend_from_slice(kind_args);
        let v = json(dir, &args);
        assert_eq!(v["event"]["type"], *kind, "{args:?}");
        assert_eq!(v["system"], "RACK-C");
    }
    let log = json(dir, &["log", "--system", "RACK-C", "--kind", "event"]);
    assert_eq!(log.as_array().unwrap().len(), cases.len());
    let wc = log.as_array().unwrap().iter().find(|v| v["event"]["type"] == "water_change").unwrap();
    assert_eq!(wc["event"]["dechlorinated"], false);
    close(&wc["event"], "source_temp_c", 24.0, 1e-12);
    let zeolite = log.as_array().unwrap().iter().find(|v| v["event"]["type"] == "zeolite_added").unwrap();
    assert_eq!(zeolite["note"], "one bag in the sump");
}

#[test]
fn corrections_show_the_current_value_and_the_trail() {
    let data = tempfile::tempdir().unwrap();
    let dir = data.path();
    let id = saved_id(&ok(
        dir,
        &["record", "--tank", "B2-07", "--temp-c", "25", "--ph", "8.2", "--tan", "1", "--note", "x"],
    ));
    let fix = json(dir, &["correct", &id, "--ph", "7.4", "--reason", "misread the colour chart"]);
    assert_eq!(fix["id"], id.as_str());
    assert_eq!(fix["corrected"], true);
    assert_eq!(fix["supersedes"], id.as_str());
    let fix_id = fix["current_id"].as_str().unwrap().to_string();
    assert_ne!(fix_id, id);

    // Correct the correction: clear the note and add a sign.
    let again =
        json(dir, &["correct", &fix_id, "--clear", "note", "--observe", "gasping", "--reason", "note was for B2-08"]);
    assert_eq!(again["supersedes"], fix_id.as_str());

    let log = json(dir, &["log"]);
    let entries = log.as_array().unwrap();
    assert_eq!(entries.len(), 1, "one entry with its trail, not three");
    let v = &entries[0];
    assert_eq!(v["id"], id.as_str());
    assert_eq!(v["ph"], 7.4);
    assert!(v["note"].is_null());
    assert_eq!(v["signs"], serde_json::json!(["gasping"]));
    let trail = v["trail"].as_array().unwrap();
    assert_eq!(trail.len(), 3);
    assert_eq!(trail[0]["id"], id.as_str(), "the original is kept as it was");
    assert_eq!(trail[0]["body"]["measurements"]["ph"], 8.2);
    assert_eq!(trail[1]["body"]["reason"], "misread the colour chart");

    // Refusals after opening: unknown id, a change that changes nothing, event options on a reading.
    let refused: &[(&[&str], &str)] = &[
        (&["correct", "01JEX5V3QK8T0W9Y2Z4A6B8C0D", "--ph", "7", "--reason", "r"], "no saved reading or event"),
        (&["correct", &id, "--ph", "7.4", "--reason", "r"], "changes nothing"),
        (&["correct", &id, "--reason", "r", "feeding-held"], "is a reading"),
        (&["correct", &id, "--reason", "r"], "nothing to correct"),
        (&["correct", &id, "--ph", "7.1"], "--reason"),
        (&["correct", &id, "--ph", "15", "--reason", "r"], "--ph: pH 15 is outside"),
        (&["correct", &id, "--withdraw", "--ph", "7", "--reason", "r"], "--withdraw"),
        (&["correct", "not-an-id", "--ph", "7", "--reason", "r"], "invalid value 'not-an-id'"),
    ];
    for (args, message) in refused {
        let out = tw(dir, args);
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {stderr}");
        assert!(stderr.contains(message), "{args:?}: expected {message:?} in {stderr}");
    }
    assert_eq!(json(dir, &["log"])[0]["trail"].as_array().unwrap().len(), 3, "refusals stored nothing");

    // An event corrected in full, then withdrawn.
    let ev = saved_id(&ok(dir, &["event", "--tank", "B2-07", "salt-added", "--grams", "500"]));
    let v = json(dir, &["correct", &ev, "--reason", "was 250 g", "salt-added", "--grams", "250"]);
    assert_eq!(v["event"]["grams"], 250.0);
    ok(dir, &["correct", &ev, "--withdraw", "--reason", "done on B2-08"]);
    assert_eq!(json(dir, &["log", "--kind", "event"]).as_array().unwrap().len(), 0, "withdrawn leaves the history");
    let all = json(dir, &["log", "--kind", "event", "--withdrawn"]);
    assert_eq!(all[0]["withdrawn"], true);
    assert_eq!(all[0]["trail"].as_array().unwrap().len(), 3);
}

/// Each field's out-of-range and malformed value: named, exit 2, nothing stored.
#[test]
fn bad_input_to_record_names_the_field_and_stores_nothing() {
    let base = ["record", "--tank", "B2-07", "--temp-c", "25", "--ph", "7", "--tan", "1"];
    let with = |extra: &[&'static str]| -> Vec<&'static str> {
        let mut v: Vec<&str> = base.to_vec();
        v.extend_from_slice(extra);
        v
    };
    let replace = |option: &str, value: &'static str| -> Vec<&'static str> {
        let mut v: Vec<&str> = base.to_vec();
        let at = v.iter().position(|a| *a == option).unwrap();
        v[at + 1] = value;
        v
    };
    let cases: Vec<(Vec<&str>, &str)> = vec![
        (replace("--temp-c", "41"), "--temp-c: temperature 41 °C is outside the allowed range 0–40 °C"),
        (replace("--temp-c", "warm"), "invalid value 'warm' for '--temp-c <C>'"),
        (replace("--temp-c", "NaN"), "--temp-c: temperature must be a finite number"),
        (
            vec!["record", "--tank", "B2-07", "--temp-f", "110"],
            "--temp-f: temperature 110 °F is outside the allowed range 32–104 °F",
        ),
        (vec!["record", "--tank", "B2-07", "--temp-f", "x"], "invalid value 'x' for '--temp-f <F>'"),
        (replace("--ph", "14.5"), "--ph: pH 14.5 is outside the allowed range 0–14"),
        (replace("--ph", "-1"), "--ph: pH -1 is outside"),
        (replace("--ph", "seven"), "invalid value 'seven' for '--ph <PH>'"),
        (replace("--ph", "inf"), "--ph: pH must be a finite number"),
        (replace("--tan", "-0.5"), "--tan: total ammonia -0.5 mg/L is outside"),
        (replace("--tan", "1,5"), "invalid value '1,5' for '--tan <MG_L>'"),
        (with(&["--tan-as", "ppm"]), "'ppm' is not an ammonia basis"),
        (with(&["--nitrite", "-1"]), "--nitrite: nitrite -1 mg/L is outside"),
        (with(&["--nitrite", "lots"]), "invalid value 'lots' for '--nitrite <MG_L>'"),
        (with(&["--nitrite", "1", "--nitrite-as", "no2x"]), "'no2x' is not a basis"),
        (with(&["--nitrate", "20000"]), "--nitrate: nitrate 20000 mg/L is outside"),
        (with(&["--nitrate", "?"]), "invalid value '?' for '--nitrate <MG_L>'"),
        (with(&["--salinity-ppt", "46"]), "--salinity-ppt: salinity 46 g/L is outside the allowed range 0–45 g/L"),
        (with(&["--salinity-ppt", "salty"]), "invalid value 'salty' for '--salinity-ppt <PPT>'"),
        (with(&["--sg", "1.2"]), "--sg: specific gravity 1.2 is outside"),
        (with(&["--sg", "1.039"]), "--sg: that reading gives salinity"),
        (with(&["--sg", "1.02", "--sg-ref-c", "60"]), "--sg-ref-c: reference temperature 60 °C is outside"),
        (with(&["--cond-us-cm", "-5"]), "--cond-us-cm: conductivity -5 µS/cm is outside"),
        (with(&["--cond-us-cm", "5e"]), "invalid value '5e' for '--cond-us-cm <US_CM>'"),
        (with(&["--cond-us-cm", "900", "--cond-ref-c", "-3"]), "--cond-ref-c: reference temperature -3 °C is outside"),
        (with(&["--sg", "1.02", "--salinity-ppt", "30"]), "cannot be used with"),
        (with(&["--do-mg-l", "45"]), "--do-mg-l: dissolved oxygen 45 mg/L is outside"),
        (with(&["--do-mg-l", "six"]), "invalid value 'six' for '--do-mg-l <MG_L>'"),
        (with(&["--chloride-mg-l", "-2"]), "--chloride-mg-l: chloride -2 mg/L is outside"),
        (with(&["--chloride-mg-l", "x"]), "invalid value 'x' for '--chloride-mg-l <MG_L>'"),
        (with(&["--alkalinity", "2500"]), "--alkalinity: alkalinity 2500 mg/L CaCO3 is outside"),
        (
            with(&["--alkalinity", "200", "--alkalinity-as", "dkh"]),
            "--alkalinity: alkalinity 200 dKH is outside the allowed range 0–112.1 dKH",
        ),
        (with(&["--alkalinity", "7", "--alkalinity-as", "gpg"]), "'gpg' is not an alkalinity unit"),
        (with(&["--observe", "gasping,coughing"]), "--observe: 'coughing' is not a sign"),
        (with(&["--deaths", "-1"]), "invalid value '-1' for '--deaths <N>'"),
        (with(&["--deaths", "two"]), "invalid value 'two' for '--deaths <N>'"),
        (with(&["--deaths", "2000000"]), "--deaths: 2000000 deaths is more than one record may count"),
        (with(&["--note", "bell\u{7}"]), "--note: contains a control character"),
        (with(&["--taken-at", "yesterday-ish"]), "--taken-at: 'yesterday-ish' is not a time"),
        (with(&["--taken-at", "2999-01-01"]), "--taken-at: 2999-01-01 is in the future"),
        (with(&["--operator", " "]), "--operator"),
        (vec!["record", "--temp-c", "25"], "say where: give --tank ID or --system ID"),
        (vec!["record", "--tank", " B2"], "--tank: the tank id ' B2' starts or ends with a space"),
        (vec!["record", "--tank", "B2-07"], "nothing to record"),
        (vec!["record", "--tank", "B2-07", "--temp-c", "25", "--temp-f", "77"], "cannot be used with"),
    ];
    let data = tempfile::tempdir().unwrap();
    let folder = data.path().join("never-created");
    for (args, message) in &cases {
        let out = tw(&folder, args);
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {stderr}");
        assert!(stderr.contains(message), "{args:?}: expected {message:?} in {stderr:?}");
        assert!(out.stdout.is_empty(), "{args:?} printed {:?}", String::from_utf8_lossy(&out.stdout));
        assert!(!folder.exists(), "{args:?}: the data folder was touched before the input was checked");
    }
    // The same mistakes on a folder with records change nothing in it.
    let dir = data.path().join("in-use");
    ok(&dir, &["record", "--tank", "B2-07", "--ph", "7"]);
    let journal = fs::read(dir.join("journal.jsonl")).unwrap();
    for (args, _) in &cases {
        assert_eq!(tw(&dir, args).status.code(), Some(2));
    }
    assert_eq!(fs::read(dir.join("journal.jsonl")).unwrap(), journal);
    assert_eq!(json(&dir, &["log"]).as_array().unwrap().len(), 1);
}

#[test]
fn a_second_process_gets_a_clear_message_and_the_first_is_unaffected() {
    let data = tempfile::tempdir().unwrap();
    let dir = data.path();
    ok(dir, &["record", "--tank", "T1", "--ph", "7.0"]);
    // This test process holds the folder open, as the walk screen would.
    let mut first = SledStore::open(dir).unwrap();
    for args in [
        &["record", "--tank", "T1", "--ph", "7.1"][..],
        &["log"][..],
        &["doctor"][..],
        &["rebuild"][..],
        &["event", "--tank", "T1", "feeding-held"][..],
    ] {
        let started = std::time::Instant::now();
        let out = tw(dir, args);
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(1), "{args:?}: {stderr}");
        assert!(stderr.contains("data folder in use by another tankwalk"), "{args:?}: {stderr}");
        assert!(stderr.contains(&format!("process {}", std::process::id())), "names the holder: {stderr}");
        assert!(!stderr.contains("panicked"), "{stderr}");
        assert!(started.elapsed() < std::time::Duration::from_secs(10), "no hang");
    }
    // The first goes on saving and reading.
    let mut r = Reading::new(Target::Tank("T1".into()));
    r.measurements.ph = Some(7.2);
    let record = Record::new(first.device(), "Tomas Reyes", chrono::Utc::now().fixed_offset(), RecordBody::Reading(r));
    first.append(std::slice::from_ref(&record)).unwrap();
    assert_eq!(first.len().unwrap(), 2);
    drop(first);
    let log = json(dir, &["log"]);
    assert_eq!(log.as_array().unwrap().len(), 2);
    assert_eq!(log[0]["id"], record.id.to_string());
}

#[test]
fn doctor_and_rebuild_bring_back_every_acknowledged_record() {
    let data = tempfile::tempdir().unwrap();
    let dir = data.path();
    let mut ids = Vec::new();
    for i in 0..12 {
        let ph = format!("{:.1}", 6.5 + f64::from(i) * 0.1);
        ids.push(saved_id(&ok(
            dir,
            &["record", "--tank", &format!("T{}", i % 3), "--temp-c", "24", "--ph", &ph, "--tan", "0.5"],
        )));
    }
    let fix = json(dir, &["correct", &ids[0], "--ph", "6.6", "--reason", "re-read"]);
    let before = json(dir, &["log"]);
    let report = json(dir, &["doctor"]);
    assert_eq!(report["agrees"], true, "{report}");
    assert_eq!(report["journal_records"], 13);

    for damage in ["delete", "garble"] {
        let db = dir.join("store");
        match damage {
            "delete" => fs::remove_dir_all(&db).unwrap(),
            _ => {
                for entry in fs::read_dir(&db).unwrap() {
                    let path = entry.unwrap().path();
                    if path.is_file() {
                        let bytes: Vec<u8> = fs::read(&path).unwrap().iter().map(|b| b ^ 0xa5).collect();
                        fs::write(&path, bytes).unwrap();
                    }
                }
            }
        }
        let out = tw(dir, &["doctor"]);
        let text = String::from_utf8_lossy(&out.stdout);
        assert_eq!(out.status.code(), Some(1), "{damage}: {text}");
        assert!(text.contains("tankwalk rebuild"), "{damage}: {text}");
        if damage == "garble" {
            let out = tw(dir, &["log"]);
            let stderr = String::from_utf8_lossy(&out.stderr);
            assert_eq!(out.status.code(), Some(1), "{stderr}");
            assert!(stderr.contains("will not open") && stderr.contains("tankwalk rebuild"), "{stderr}");
            assert!(!stderr.contains("panicked"), "{stderr}");
        }
        let rebuilt = json(dir, &["rebuild"]);
        assert_eq!(rebuilt["records"], 13, "{damage}: {rebuilt}");
        let after = json(dir, &["log"]);
        assert_eq!(after, before, "{damage}: the same history, corrections included");
        assert_eq!(json(dir, &["doctor"])["agrees"], true);
    }
    assert_eq!(before[before.as_array().unwrap().len() - 1]["current_id"], fix["current_id"]);
    // Nothing was deleted: the damaged database was moved aside.
    let aside = fs::read_dir(dir)
        .unwrap()
        .filter(|e| e.as_ref().unwrap().file_name().to_string_lossy().starts_with("store.damaged-"))
        .count();
    assert_eq!(aside, 1, "the garbled database is kept");
}
