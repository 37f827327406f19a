//! `tankwalk calc` through the built binary: answers and refusals.

use std::process::{Command, Output};

fn calc(args: &[&str]) -> Output {
    Command::new(env!("CARGO_BIN_EXE_tankwalk")).arg("calc").args(args).env_clear().output().expect("binary runs")
}

fn json(args: &[&str]) -> serde_json::Value {
    let mut all = args.to_vec();
    all.push("--json");
    let out = calc(&all);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    serde_json::from_slice(&out.stdout).expect("one JSON object")
}

fn close(value: &serde_json::Value, key: &str, expected: f64, tol_rel: f64) {
    let got = value[key].as_f64().unwrap_or_else(|| panic!("{key} missing in {value}"));
    assert!((got - expected).abs() <= tol_rel * expected.abs(), "{key}: {got} vs {expected}");
}

#[test]
fn json_has_the_promised_keys_and_values() {
    let v = json(&["--temp-c", "25", "--ph", "8.0", "--tan", "1.0"]);
    // Reference row UNITS-013: 1 mg TAN-N/L at pH 8.0, 25 °C → 0.06524760874489856
    // mg NH3/L (Emerson et al. 1975; IUPAC atomic weights).
    close(&v, "nh3_mg_l", 0.06524760874489856, 1e-9);
    // Reference row NH3_FW-041: fraction 0.053662336661957265 (Emerson et al. 1975).
    close(&v, "nh3_fraction", 0.053662336661957265, 1e-9);
    close(&v, "nh3_n_mg_l", 0.053662336661957265, 1e-9);
    close(&v, "pka", 9.246376545363074, 1e-9);
    close(&v, "tan_n_mg_l", 1.0, 0.0);
    close(&v, "salinity_ppt", 0.0, 0.0);
    // EPA-822-R-13-001, 25 °C pH 8.0: acute 2.6, chronic 0.56 mg TAN/L (2 s.f.).
    close(&v, "epa2013_acute_tan_n_mg_l", 2.6, 0.02);
    close(&v, "epa2013_chronic_tan_n_mg_l", 0.56, 0.01);
    assert_eq!(v["band"], "act");
    assert!(v["caution"].as_str().unwrap().contains("not veterinary advice"));
    assert!(v.get("do_percent").is_none());
}

#[test]
fn kit_bases_and_fahrenheit_convert() {
    // 1.21589 mg "as NH3" is 1 mg TAN-N (IUPAC weights, reference §3).
    let v = json(&["--temp-f", "77", "--ph", "8.0", "--tan", "1.2158920539730134", "--tan-as", "nh3"]);
    close(&v, "tan_n_mg_l", 1.0, 1e-12);
    close(&v, "temp_c", 25.0, 1e-12);
    close(&v, "nh3_mg_l", 0.06524760874489856, 1e-9);
}

#[test]
fn salinity_from_each_instrument() {
    // Reference row SG: SG 1.025 at 25/25 °C is S = 33.19 (EOS-80, seawater 3.3.5).
    let v = json(&["--temp-c", "25", "--ph", "8.0", "--tan", "1", "--sg", "1.025", "--sg-ref-c", "25"]);
    assert!((v["salinity_ppt"].as_f64().unwrap() - 33.19).abs() < 0.01);
    assert!(v["epa2013_acute_tan_n_mg_l"].is_null(), "no freshwater criteria in sea water");
    // gsw 3.6.23 SP_from_C(53 mS/cm, 25 °C, 0) = 34.947 (PSS-78).
    let v = json(&["--temp-c", "25", "--ph", "8.0", "--tan", "1", "--cond-us-cm", "53000"]);
    assert!((v["salinity_ppt"].as_f64().unwrap() - 34.947).abs() < 0.001);
    // Bower–Bidwell, S = 34, 25 °C, pH 8.0: 4.278 % (reference §2a table).
    let v = json(&["--temp-c", "25", "--ph", "8.0", "--tan", "1", "--salinity-ppt", "34"]);
    close(&v, "nh3_fraction", 0.04278266403267689, 1e-9);
}

#[test]
fn oxygen_percent_with_elevation() {
    // Benson & Krause 1984 at 25 °C, S = 0, 1000 m (0.88699 atm): 7.300 mg/L.
    let v = json(&["--temp-c", "25", "--ph", "7", "--tan", "0.1", "--do-mg-l", "7.3", "--elevation-m", "1000"]);
    close(&v, "do_saturation_mg_l", 7.300, 1e-3);
    close(&v, "do_percent", 100.0, 1e-3);
}

#[test]
fn table_output_names_units_and_caution() {
    let out = calc(&["--temp-c", "25", "--ph", "8.0", "--tan", "1.0"]);
    let text = String::from_utf8(out.stdout).unwrap();
    assert!(out.status.success());
    for needle in ["5.366 %", "0.0652 mg/L NH3", "0.0537 mg/L NH3-N", "act", "NBS", "not veterinary advice"] {
        assert!(text.contains(needle), "missing {needle:?} in\n{text}");
    }
}

#[test]
fn unusual_values_warn_but_answer() {
    let v = json(&["--temp-c", "25", "--ph", "4.5", "--tan", "1"]);
    let warnings = v["warnings"].as_array().unwrap();
    assert_eq!(warnings.len(), 1);
    assert!(warnings[0].as_str().unwrap().starts_with("--ph: pH 4.5 is unusual"));
}

#[test]
fn bad_input_is_refused_with_the_option_named() {
    let cases: &[(&[&str], &str)] = &[
        (&["--temp-c", "25", "--ph", "15", "--tan", "1"], "--ph: pH 15 is outside the allowed range 0–14"),
        (&["--temp-c", "25", "--ph", "-1", "--tan", "1"], "--ph: pH -1 is outside the allowed range 0–14"),
        (&["--temp-c", "25", "--ph", "7", "--tan", "-0.5"], "--tan: total ammonia -0.5 mg/L is outside"),
        (
            &["--temp-c", "45", "--ph", "7", "--tan", "1"],
            "--temp-c: temperature 45 °C is outside the allowed range 0–40 °C",
        ),
        (&["--temp-c", "-2", "--ph", "7", "--tan", "1"], "--temp-c: temperature -2 °C is outside"),
        (
            &["--temp-f", "120", "--ph", "7", "--tan", "1"],
            "--temp-f: temperature 120 °F is outside the allowed range 32–104 °F",
        ),
        (
            &["--temp-c", "25", "--ph", "7", "--tan", "1", "--salinity-ppt", "50"],
            "--salinity-ppt: salinity 50 g/L is outside the allowed range 0–45 g/L",
        ),
        (
            &["--temp-c", "25", "--ph", "7", "--tan", "1", "--salinity-ppt", "-1"],
            "--salinity-ppt: salinity -1 g/L is outside",
        ),
        (&["--temp-c", "25", "--ph", "7", "--tan", "1", "--sg", "1.2"], "--sg: specific gravity 1.2 is outside"),
        (
            &["--temp-c", "25", "--ph", "7", "--tan", "1", "--cond-us-cm", "-5"],
            "--cond-us-cm: conductivity -5 µS/cm is outside",
        ),
        (
            &["--temp-c", "25", "--ph", "7", "--tan", "1", "--do-mg-l", "-1"],
            "--do-mg-l: dissolved oxygen -1 mg/L is outside",
        ),
        (&["--temp-c", "25", "--ph", "NaN", "--tan", "1"], "--ph: pH must be a finite number"),
        (&["--temp-c", "25", "--ph", "inf", "--tan", "1"], "--ph: pH must be a finite number"),
        (&["--temp-c", "25", "--ph", "seven", "--tan", "1"], "invalid value 'seven' for '--ph <PH>'"),
        (&["--temp-c", "25", "--ph", "7", "--tan", "1", "--tan-as", "ppm"], "'ppm' is not an ammonia basis"),
        (&["--ph", "7", "--tan", "1"], "--temp-c"),
        (&["--temp-c", "25", "--temp-f", "77", "--ph", "7", "--tan", "1"], "cannot be used with"),
        (&["--temp-c", "25", "--ph", "7", "--tan", "1", "--sg", "1.02", "--salinity-ppt", "30"], "cannot be used with"),
        (&["--temp-c", "25", "--ph", "7"], "--tan"),
        (
            &["--temp-c", "25", "--ph", "7", "--tan", "1", "--elevation-m", "9000"],
            "--elevation-m: elevation 9000 m is outside",
        ),
    ];
    for (args, message) in cases {
        let out = calc(args);
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {stderr}");
        assert!(stderr.contains(message), "{args:?}: expected {message:?} in {stderr:?}");
        assert!(out.stdout.is_empty(), "{args:?} printed a result");
        assert!(!stderr.contains("panicked"), "{args:?} panicked");
    }
}

fn room_calc(args: &[&str]) -> Output {
    let room = concat!(env!("CARGO_MANIFEST_DIR"), "/sample-rooms/harbourside-holding.toml");
    let data = tempfile::tempdir().unwrap();
    Command::new(env!("CARGO_BIN_EXE_tankwalk"))
        .args(["--room", room, "--data-dir"])
        .arg(data.path())
        .arg("calc")
        .args(args)
        .env_clear()
        .output()
        .expect("binary runs")
}

#[test]
fn with_a_tank_the_assessment_comes_with_the_figures() {
    // B-01 (neon, edges 0.015/0.04/0.15) on RACK-B: 25 °C, pH 7.0, 8 mg/L TAN-N →
    // NH3-N 0.0451 (act); at the room's source pH 7.6 → 0.177 (critical).
    let out = room_calc(&["--tank", "B-01", "--temp-c", "25", "--ph", "7.0", "--tan", "8", "--json"]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    assert_eq!(v["band"], "act");
    assert_eq!(v["latent_band"], "critical");
    assert_eq!(v["latent"]["basis"], "source-water");
    let kinds: Vec<&str> = v["actions"].as_array().unwrap().iter().map(|a| a["kind"].as_str().unwrap()).collect();
    assert_eq!(kinds.first(), Some(&"water-change"), "{kinds:?}");
    assert!(kinds.contains(&"zeolite") && !kinds.contains(&"add-salt"), "{kinds:?}");
    let change = &v["actions"][0];
    assert_eq!(change["unit"], "%");
    assert_eq!(change["also"]["unit"], "L");
    assert!(v["do_not"].as_array().unwrap().iter().any(|w| w["kind"] == "do-not-raise-ph"));
    // The text form lists the actions and the caution.
    let out = room_calc(&["--tank", "B-01", "--temp-c", "25", "--ph", "7.0", "--tan", "8"]);
    let text = String::from_utf8(out.stdout).unwrap();
    for needle in ["Do now:", "1. Water change", "Do not:", "critical", "not veterinary advice"] {
        assert!(text.contains(needle), "missing {needle:?} in\n{text}");
    }
}

#[test]
fn what_if_moves_nh3_and_band() {
    // Reference §8: TAN 2.0 at pH 7.0, 25 °C; a 50 % change takes TAN to 1.0 + 0.5 × 0.3
    // (the room's source carries 0.3 mg/L TAN-N) = 1.15 at the source's pH 7.6 and
    // (25 + 24)/2 = 24.5 °C.
    let out = room_calc(&[
        "--tank",
        "A-03",
        "--temp-c",
        "25",
        "--ph",
        "7.0",
        "--tan",
        "2",
        "--what-if",
        "change=50",
        "--json",
    ]);
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let v: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let w = &v["what_if"];
    assert!((w["tan_n_mg_l"].as_f64().unwrap() - 1.15).abs() < 1e-12, "{w}");
    assert_eq!(w["ph"], 7.6);
    assert!((w["temp_c"].as_f64().unwrap() - 24.5).abs() < 1e-12);
    // NH3-N before 2.0 × 0.005639 = 0.0113 (clear); after 1.15 × f(24.5 °C, 7.6) ≈ 0.0244 (watch):
    // halving total ammonia with more alkaline water raised the toxic part.
    assert_eq!(v["band"], "clear");
    assert_eq!(w["band"], "watch");
    // Cooler and lower pH without a tank: pH 7.0 at 25 °C with 1 mg/L → 0.0056 NH3-N.
    let v = json(&["--temp-c", "25", "--ph", "8.0", "--tan", "1", "--what-if", "ph=7.0"]);
    assert!((v["what_if"]["nh3_n_mg_l"].as_f64().unwrap() - 0.00563855384336188).abs() < 1e-12);
    assert_eq!(v["latent_band"], "act", "pH 8.5 at 25 °C: 0.152 NH3-N");
}

#[test]
fn what_if_refuses_bad_changes() {
    let cases: &[(&[&str], &str)] = &[
        (&["--what-if", "change=40"], "--what-if change: a water change needs the tank"),
        (&["--what-if", "ph=15"], "--what-if ph: pH 15 is outside the allowed range 0–14"),
        (&["--what-if", "colour=red"], "--what-if colour: 'red' is not a number"),
        (&["--what-if", "colour=1"], "--what-if: unknown change 'colour'"),
        (&["--what-if", "ph"], "--what-if: 'ph' is not key=value"),
        (&["--what-if", ""], "--what-if: no change given"),
    ];
    for (extra, message) in cases {
        let mut args = vec!["--temp-c", "25", "--ph", "7", "--tan", "1"];
        args.extend_from_slice(extra);
        let out = calc(&args);
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(2), "{args:?}: {stderr}");
        assert!(stderr.contains(message), "{args:?}: expected {message:?} in {stderr:?}");
    }
}
