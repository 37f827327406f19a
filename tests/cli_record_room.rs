//! `record`, `event` and `log` with a room: ids checked against the facility,
//! the tank's system filled in, the kit's basis, and the full assessment in
//! the output.

use std::path::Path;
use std::process::{Command, Output};

use serde_json::Value;

fn room(name: &str) -> String {
    format!("{}/sample-rooms/{name}", env!("CARGO_MANIFEST_DIR"))
}

fn tw(dir: &Path, args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_tankwalk"))
        .args(args)
        .env_clear()
        .env("TANKWALK_DATA", dir)
        .env("TANKWALK_OPERATOR", "Ines Marlow")
        .output()
        .expect("binary runs")
}

fn json(dir: &Path, args: &[&str]) -> Value {
    let out = tw(dir, args);
    assert!(out.status.success(), "{args:?}: {}", String::from_utf8_lossy(&out.stderr));
    serde_json::from_slice(&out.stdout).expect("JSON")
}

#[test]
fn a_rack_tank_history_is_assessed_with_its_system() {
    let data = tempfile::tempdir().unwrap();
    let dir = data.path();
    let harbourside = room("harbourside-holding.toml");
    // Three days of rising ammonia: two tank readings and one on the shared sump.
    json(
        dir,
        &[
            "--room",
            &harbourside,
            "record",
            "--tank",
            "a-03",
            "--temp-c",
            "25",
            "--ph",
            "7.6",
            "--tan",
            "0.5",
            "--taken-at",
            "3d",
            "--json",
        ],
    );
    json(
        dir,
        &["record", "--tank", "A-03", "--temp-c", "25", "--ph", "7.7", "--tan", "0.8", "--taken-at", "2d", "--json"],
    );
    let system = json(
        dir,
        &[
            "record",
            "--system",
            "RACK-A",
            "--temp-c",
            "25",
            "--ph",
            "7.8",
            "--tan",
            "1.2",
            "--taken-at",
            "1d",
            "--json",
        ],
    );
    assert_eq!(system["system"], "RACK-A");
    // 26 °C, pH 7.9, 1.6 mg/L TAN-N: NH3-N 1.6 × f = 0.0738 (act; Emerson 1975), raised to
    // critical by gasping fish.
    let v = json(
        dir,
        &[
            "record",
            "--tank",
            "A-03",
            "--temp-c",
            "26",
            "--ph",
            "7.9",
            "--tan",
            "1.6",
            "--observe",
            "gasping",
            "--json",
        ],
    );
    assert_eq!(v["tank"], "A-03", "the id is stored as the room spells it");
    assert_eq!(v["system"], "RACK-A");
    assert_eq!(v["measured_band"], "act");
    assert_eq!(v["band"], "critical");
    assert_eq!(v["latent_band"], "critical");
    assert_eq!(v["trend"]["direction"], "rising");
    assert_eq!(v["trend"]["readings"], 4, "the system reading counts for the tank");
    assert_eq!(v["biofilter"]["state"], "rising-in-established");
    let kinds: Vec<&str> = v["actions"].as_array().unwrap().iter().map(|a| a["kind"].as_str().unwrap()).collect();
    for kind in ["call-veterinarian", "water-change", "hold-feeding", "aerate", "check-biofilter"] {
        assert!(kinds.contains(&kind), "{kind} missing in {kinds:?}");
    }
    let change = v["actions"].as_array().unwrap().iter().find(|a| a["kind"] == "water-change").unwrap();
    assert!(change["reason"].as_str().unwrap().contains("system RACK-A's whole volume, 1780 L"), "{change}");
    assert!(v["caution"].as_str().unwrap().contains("not veterinary advice"));

    let log = json(dir, &["log", "--tank", "A-03", "--json"]);
    let log = log.as_array().unwrap();
    assert_eq!(log.len(), 4);
    for entry in log {
        for key in [
            "id",
            "kind",
            "tank",
            "system",
            "taken_at",
            "temp_c",
            "ph",
            "tan_n_mg_l",
            "nh3_mg_l",
            "band",
            "supersedes",
            "latent_band",
            "trend",
            "biofilter",
            "actions",
        ] {
            assert!(entry.get(key).is_some(), "{key} missing in {entry}");
        }
    }
    assert_eq!(log[0]["band"], "critical");
    assert_eq!(log.last().unwrap()["band"], "clear");
}

#[test]
fn unknown_ids_are_refused_and_nothing_is_stored() {
    let data = tempfile::tempdir().unwrap();
    let dir = data.path();
    let harbourside = room("harbourside-holding.toml");
    for (args, message) in [
        (
            vec!["--room", &harbourside, "record", "--tank", "A-99", "--ph", "7"],
            "--tank: no tank 'A-99' in room 'Harbourside Tropicals holding room' (closest: A-09)",
        ),
        (vec!["record", "--system", "RACK-Z", "--ph", "7"], "--system: no system 'RACK-Z'"),
        (
            vec!["record", "--tank", "A-03", "--system", "RACK-B", "--ph", "7"],
            "--system: tank A-03 is on system RACK-A, not on 'RACK-B'",
        ),
        (vec!["event", "--tank", "Q-9", "feeding-held"], "--tank: no tank 'Q-9'"),
    ] {
        let out = tw(dir, &args);
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {stderr}");
        assert!(stderr.contains(message), "{args:?}: expected {message:?} in {stderr}");
    }
    assert_eq!(json(dir, &["log", "--json"]), serde_json::json!([]));
}

#[test]
fn the_rooms_kit_basis_is_the_default() {
    let data = tempfile::tempdir().unwrap();
    let dir = data.path();
    // The tub room's kit reports as NH4+: 1.2878560719640182 mg/L as NH4+ is 1 mg TAN-N
    // (IUPAC atomic weights; reference sheet §3, NH4_per_N).
    let tubs = room("cattail-bend-tubs.toml");
    let v = json(
        dir,
        &[
            "--room",
            &tubs,
            "record",
            "--tank",
            "T-01",
            "--temp-f",
            "77",
            "--ph",
            "8.0",
            "--tan",
            "1.2878560719640182",
            "--json",
        ],
    );
    assert!((v["tan_n_mg_l"].as_f64().unwrap() - 1.0).abs() < 1e-12, "{v}");
    assert_eq!(v["measurements"]["total_ammonia"]["as"], "nh4");
    // 25 °C, pH 8.0, TAN-N 1.0: 0.06525 mg NH3/L (reference row UNITS-013).
    assert!((v["nh3_mg_l"].as_f64().unwrap() - 0.06524760874489856).abs() < 1e-9);
}

#[test]
fn a_skip_is_stored_with_its_reason() {
    let data = tempfile::tempdir().unwrap();
    let dir = data.path();
    let harbourside = room("harbourside-holding.toml");
    let v = json(dir, &["--room", &harbourside, "skip", "--tank", "Q-4", "--reason", "empty, being cycled", "--json"]);
    assert_eq!(v["kind"], "skip");
    assert_eq!(v["note"], "empty, being cycled");
    let out = tw(dir, &["skip", "--tank", "Q-4", "--reason", "  "]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("--reason"), "{}", String::from_utf8_lossy(&out.stderr));
    let log = json(dir, &["log", "--json"]);
    assert_eq!(log.as_array().unwrap().len(), 1);
    let text = String::from_utf8(tw(dir, &["log"]).stdout).unwrap();
    assert!(text.contains("skipped: empty, being cycled"), "{text}");
}
