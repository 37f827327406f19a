//! `tankwalk check-room`, the remembered `--room` and `calc --tank`, through the built binary.

use std::path::{Path, PathBuf};
use std::process::{Command, Output};

fn root() -> &'static Path {
    Path::new(env!("CARGO_MANIFEST_DIR"))
}

fn sample(name: &str) -> PathBuf {
    root().join("sample-rooms").join(name)
}

fn broken() -> PathBuf {
    root().join("tests/fixtures/broken-room.toml")
}

/// Runs the binary with a clean environment and its own data folder.
fn run(data: &Path, args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_tankwalk"))
        .arg("--data-dir")
        .arg(data)
        .args(args)
        .env_clear()
        .current_dir(root())
        .output()
        .expect("binary runs")
}

fn text(bytes: &[u8]) -> String {
    String::from_utf8_lossy(bytes).into_owned()
}

fn json(out: &Output) -> serde_json::Value {
    serde_json::from_slice(&out.stdout).unwrap_or_else(|e| panic!("{e}: {}", text(&out.stdout)))
}

#[test]
fn valid_room_gets_a_one_screen_summary() {
    let data = tempfile::tempdir().unwrap();
    let out = run(data.path(), &["check-room", "sample-rooms/harbourside-holding.toml"]);
    let stdout = text(&out.stdout);
    assert_eq!(out.status.code(), Some(0), "{stdout}{}", text(&out.stderr));
    for needle in [
        "Harbourside Tropicals holding room",
        "52 tanks (48 on 4 systems, 4 standalone)",
        "15 species",
        "reports total ammonia mg/L TAN-N",
        "RACK-A",
        "12 tanks",
        "round     A-01 A-02",
        "fields    temperature, ph, total-ammonia, nitrite; optional: nitrate, salinity, dissolved-oxygen (the default)",
        "ok: sample-rooms/harbourside-holding.toml is a valid facility file",
    ] {
        assert!(stdout.contains(needle), "missing {needle:?} in\n{stdout}");
    }
    assert!(stdout.lines().count() <= 24, "more than one screen:\n{stdout}");
    assert!(!data.path().join("last-room").exists(), "checking a file does not make it the room");
}

#[test]
fn every_sample_room_passes() {
    let data = tempfile::tempdir().unwrap();
    for name in ["harbourside-holding.toml", "cattail-bend-tubs.toml", "saltmarsh-marine.toml"] {
        let out = run(data.path(), &["check-room", sample(name).to_str().unwrap()]);
        assert_eq!(out.status.code(), Some(0), "{name}: {}", text(&out.stdout));
        if name == "cattail-bend-tubs.toml" {
            let fields = "fields    ph, temperature, total-ammonia, nitrite; optional: nitrate, alkalinity, salinity";
            assert!(text(&out.stdout).contains(fields), "{}", text(&out.stdout));
        }
    }
}

#[test]
fn broken_room_lists_every_error_with_file_line_and_column() {
    let data = tempfile::tempdir().unwrap();
    let out = run(data.path(), &["check-room", "tests/fixtures/broken-room.toml"]);
    assert_eq!(out.status.code(), Some(1));
    let stdout = text(&out.stdout);
    let planted: Vec<usize> = std::fs::read_to_string(broken())
        .unwrap()
        .lines()
        .enumerate()
        .filter(|(_, l)| l.contains("# ERROR:"))
        .map(|(i, _)| i + 1)
        .collect();
    let lines: Vec<&str> = stdout.lines().collect();
    assert_eq!(lines.len(), planted.len() + 1, "{stdout}");
    for (line, expected) in lines.iter().zip(&planted) {
        let prefix = format!("tests/fixtures/broken-room.toml:{expected}:");
        assert!(line.starts_with(&prefix), "{line:?} should start with {prefix:?}");
        let rest = &line[prefix.len()..];
        let (column, message) = rest.split_once(": ").unwrap();
        assert!(column.parse::<usize>().unwrap() >= 1);
        assert!(!message.is_empty());
    }
    assert_eq!(lines.last().unwrap(), &"9 errors: tests/fixtures/broken-room.toml is not a usable facility file");
}

#[test]
fn json_for_a_valid_room() {
    let data = tempfile::tempdir().unwrap();
    let out = run(data.path(), &["check-room", "sample-rooms/saltmarsh-marine.toml", "--json"]);
    assert_eq!(out.status.code(), Some(0));
    let v = json(&out);
    assert_eq!(v["valid"], true);
    assert_eq!(v["errors"].as_array().unwrap().len(), 0);
    assert_eq!(v["room"]["systems"], 2);
    assert_eq!(v["room"]["tanks"], 16);
    assert_eq!(v["room"]["kit_basis"], "nh3");
    assert_eq!(v["room"]["round"].as_array().unwrap().len(), 16);
    assert_eq!(v["room"]["system_list"][0]["salinity_g_l"], 33.0);
}

#[test]
fn json_for_a_broken_room() {
    let data = tempfile::tempdir().unwrap();
    let out = run(data.path(), &["check-room", "tests/fixtures/broken-room.toml", "--json"]);
    assert_eq!(out.status.code(), Some(1));
    let v = json(&out);
    assert_eq!(v["valid"], false);
    let errors = v["errors"].as_array().unwrap();
    assert_eq!(errors.len(), 9);
    let first = &errors[0];
    assert_eq!(first["file"], "tests/fixtures/broken-room.toml");
    assert_eq!(first["line"], 25);
    assert_eq!(first["column"], 36);
    assert_eq!(first["field"], "room.round_order[2]");
    assert!(first["message"].as_str().unwrap().contains("'FISH-3'"));
    assert_eq!(errors[7]["field"], "tanks[14].stock");
}

#[test]
fn warnings_do_not_fail_the_check() {
    let data = tempfile::tempdir().unwrap();
    let dir = tempfile::tempdir().unwrap();
    let file = dir.path().join("room.toml");
    let room = std::fs::read_to_string(sample("saltmarsh-marine.toml")).unwrap();
    std::fs::write(&file, room.replace("set_up = 2026-11-27", "set_up = 2999-11-27")).unwrap();
    let out = run(data.path(), &["check-room", file.to_str().unwrap()]);
    let stdout = text(&out.stdout);
    assert_eq!(out.status.code(), Some(0), "{stdout}");
    assert!(stdout.contains(": warning: tank 'N-06' was set up on 2999-11-27"), "{stdout}");
    assert!(stdout.contains("(1 warning)"));
}

#[test]
fn a_missing_file_is_an_input_error_naming_it() {
    let data = tempfile::tempdir().unwrap();
    let out = run(data.path(), &["check-room", "no-such-room.toml"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(text(&out.stderr).contains("cannot read facility file no-such-room.toml"), "{}", text(&out.stderr));
}

const READING: [&str; 6] = ["--temp-c", "25", "--ph", "7.2", "--tan", "1"];

fn calc_tank(data: &Path, room: Option<&Path>, tank: &str) -> Output {
    let mut args: Vec<&str> = Vec::new();
    if let Some(room) = room {
        args.extend(["--room", room.to_str().unwrap()]);
    }
    args.extend(["calc", "--tank", tank, "--json"]);
    args.extend(READING);
    run(data, &args)
}

#[test]
fn room_is_remembered_for_next_time() {
    let data = tempfile::tempdir().unwrap();
    let room = sample("harbourside-holding.toml");
    let out = calc_tank(data.path(), Some(&room), "B-01");
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let memo = std::fs::read_to_string(data.path().join("last-room")).unwrap();
    assert_eq!(memo.trim_end(), room.to_str().unwrap());
    // The next command, without --room, uses the same room.
    let again = calc_tank(data.path(), None, "b-01");
    assert_eq!(again.status.code(), Some(0), "{}", text(&again.stderr));
    assert_eq!(json(&again)["tank"]["id"], "B-01");
}

#[test]
fn environment_names_the_room_too() {
    let data = tempfile::tempdir().unwrap();
    let out = Command::new(env!("CARGO_BIN_EXE_tankwalk"))
        .args(["--data-dir", data.path().to_str().unwrap(), "calc", "--tank", "S-01", "--json"])
        .args(READING)
        .env_clear()
        .env("TANKWALK_ROOM", sample("saltmarsh-marine.toml"))
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    assert!(data.path().join("last-room").exists());
}

#[test]
fn tank_sets_band_edges_salinity_and_water_volume() {
    let data = tempfile::tempdir().unwrap();
    // B-01 holds neon tetras, whose profile lowers the edges to 0.015 / 0.04 / 0.15 mg NH3-N/L.
    let v = json(&calc_tank(data.path(), Some(&sample("harbourside-holding.toml")), "B-01"));
    assert_eq!(v["band_edges_nh3_n_mg_l"]["watch"], 0.015);
    assert_eq!(v["band_edges_source"], "species profile 'neon'");
    assert_eq!(v["tank"]["system"], "RACK-B");
    assert_eq!(v["tank"]["water_volume_l"], 1800.0);
    assert_eq!(v["tank"]["tank_volume_l"], 120.0);
    assert_eq!(v["tank"]["species_names"][0], "Neon tetra (Paracheirodon innesi)");
    assert_eq!(v["elevation_m"], 12.0, "the room's elevation");
    // Marine tank: the system's 33 g/L is used when no salinity is given.
    let v = json(&calc_tank(data.path(), Some(&sample("saltmarsh-marine.toml")), "S-03"));
    assert_eq!(v["salinity_ppt"], 33.0);
    assert!(v["epa2013_acute_tan_n_mg_l"].is_null());
    // The marine kit reads "as NH3": 1 mg/L as NH3 is 14.007 / 17.031 mg TAN-N/L (IUPAC weights).
    assert!((v["tan_n_mg_l"].as_f64().unwrap() - 14.007 / 17.031).abs() < 1e-12);
    assert_eq!(v["tan_as"], "nh3");
}

#[test]
fn options_given_override_the_tank() {
    let data = tempfile::tempdir().unwrap();
    let room = sample("saltmarsh-marine.toml");
    let mut args = vec!["--room", room.to_str().unwrap(), "calc", "--tank", "S-03", "--json"];
    args.extend(READING);
    args.extend(["--salinity-ppt", "30", "--tan-as", "n", "--elevation-m", "100"]);
    let out = run(data.path(), &args);
    assert_eq!(out.status.code(), Some(0), "{}", text(&out.stderr));
    let v = json(&out);
    assert_eq!(v["salinity_ppt"], 30.0);
    assert_eq!(v["tan_n_mg_l"], 1.0);
    assert_eq!(v["elevation_m"], 100.0);
}

#[test]
fn readings_outside_the_species_ranges_warn() {
    let data = tempfile::tempdir().unwrap();
    let room = sample("harbourside-holding.toml");
    let out = run(
        data.path(),
        &["--room", room.to_str().unwrap(), "calc", "--tank", "B-01", "--temp-c", "30", "--ph", "8", "--tan", "1"],
    );
    let stdout = text(&out.stdout);
    assert_eq!(out.status.code(), Some(0));
    assert!(stdout.contains("warning: temperature 30.0 °C is outside the 20–26 °C kept for neon"), "{stdout}");
    assert!(stdout.contains("warning: pH 8 is outside the 5.5–7.5 kept for neon"), "{stdout}");
    assert!(stdout.contains("B-01, "), "{stdout}");
    assert!(stdout.contains("1800 L shared on system RACK-B"), "{stdout}");
}

#[test]
fn no_room_anywhere_says_how_to_give_one() {
    let data = tempfile::tempdir().unwrap();
    let out = calc_tank(data.path(), None, "A-01");
    assert_eq!(out.status.code(), Some(2));
    assert!(text(&out.stderr).contains("no room given: pass --room FILE"), "{}", text(&out.stderr));
}

#[test]
fn a_broken_room_is_named_and_not_remembered() {
    let data = tempfile::tempdir().unwrap();
    let out = calc_tank(data.path(), Some(&broken()), "S-01");
    let stderr = text(&out.stderr);
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr.contains("broken-room.toml has 9 errors; `tankwalk check-room"), "{stderr}");
    assert!(stderr.contains("broken-room.toml:25:36: "), "{stderr}");
    assert!(!data.path().join("last-room").exists());
}

#[test]
fn a_remembered_room_that_is_gone_is_named() {
    let data = tempfile::tempdir().unwrap();
    let dir = tempfile::tempdir().unwrap();
    let copy = dir.path().join("room.toml");
    std::fs::copy(sample("saltmarsh-marine.toml"), &copy).unwrap();
    assert_eq!(calc_tank(data.path(), Some(&copy), "S-01").status.code(), Some(0));
    std::fs::remove_file(&copy).unwrap();
    let out = calc_tank(data.path(), None, "S-01");
    let stderr = text(&out.stderr);
    assert_eq!(out.status.code(), Some(2));
    assert!(stderr.contains(&format!("cannot read facility file {}", copy.display())), "{stderr}");
    assert!(stderr.contains("the room used last, remembered in"), "{stderr}");
}

#[test]
fn an_unknown_tank_is_an_input_error() {
    let data = tempfile::tempdir().unwrap();
    let out = calc_tank(data.path(), Some(&sample("cattail-bend-tubs.toml")), "T-99");
    assert_eq!(out.status.code(), Some(2));
    assert!(text(&out.stderr).contains("--tank: no tank 'T-99' in room"), "{}", text(&out.stderr));
}
