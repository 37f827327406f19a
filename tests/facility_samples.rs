//! The shipped sample rooms load, look like the rooms they describe, write back
//! to TOML unchanged, and mark where every species number comes from; the
//! broken fixture gives every planted error, each on its line.

use std::path::{Path, PathBuf};

use chrono::NaiveDate;
use tankwalk::model::{Facility, ReadingField, RoundOrder, WaterType};

/// A fixed "today" after every date in the samples, so the test does not depend on the clock.
fn today() -> NaiveDate {
    NaiveDate::from_ymd_opt(2026, 12, 1).unwrap()
}

fn sample(name: &str) -> PathBuf {
    Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-rooms").join(name)
}

fn load(name: &str) -> Facility {
    let checked = Facility::load_checked(&sample(name), Some(today())).unwrap_or_else(|e| panic!("{name}: {e}"));
    assert!(checked.warnings.is_empty(), "{name} has warnings: {:?}", checked.warnings);
    checked.facility
}

fn sample_files() -> Vec<PathBuf> {
    let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-rooms");
    let mut files: Vec<PathBuf> = std::fs::read_dir(&dir)
        .unwrap()
        .map(|e| e.unwrap().path())
        .filter(|p| p.extension().is_some_and(|x| x == "toml"))
        .collect();
    files.sort();
    files
}

#[test]
fn there_are_three_sample_rooms() {
    let names: Vec<String> =
        sample_files().iter().map(|p| p.file_name().unwrap().to_string_lossy().into_owned()).collect();
    assert_eq!(names, ["cattail-bend-tubs.toml", "harbourside-holding.toml", "saltmarsh-marine.toml"]);
}

#[test]
fn every_sample_room_writes_back_unchanged() {
    for path in sample_files() {
        let facility = Facility::load(&path).unwrap_or_else(|e| panic!("{}: {e}", path.display()));
        let text = facility.to_toml_string();
        let again = Facility::parse(&text, Path::new("written.toml")).unwrap_or_else(|e| panic!("{e}\n{text}"));
        assert_eq!(again, facility, "{}", path.display());
    }
}

#[test]
fn wholesale_holding_room_has_four_racks_of_twelve_and_quarantine() {
    let f = load("harbourside-holding.toml");
    assert_eq!(f.systems.len(), 4);
    for system in &f.systems {
        assert_eq!(f.tanks_on(system).len(), 12, "{}", system.id);
        let tanks: f64 = f.tanks_on(system).iter().map(|t| t.volume_l).sum();
        assert!(system.volume_l > tanks, "the sump adds water: {}", system.id);
        assert_eq!(system.water_type, WaterType::Fresh);
    }
    let quarantine: Vec<_> = f.tanks.iter().filter(|t| !t.is_on_system()).collect();
    assert!((3..=6).contains(&quarantine.len()));
    assert!(quarantine.iter().all(|t| t.id.as_str().starts_with('Q')));
    // A tank on a rack doses and changes water on the whole rack.
    let a1 = f.tank("A-01").unwrap();
    assert_eq!(f.water_volume_l(a1), f.system("RACK-A").unwrap().volume_l);
    // Quarantine is walked last.
    let round = f.round();
    assert_eq!(round.len(), f.tanks.len());
    assert!(round[round.len() - quarantine.len()..].iter().all(|t| !t.is_on_system()));
    assert!(f.tanks.iter().any(|t| t.species.len() > 1), "some tanks are mixed");
}

#[test]
fn breeder_room_has_about_forty_standalone_tubs_some_new() {
    let f = load("cattail-bend-tubs.toml");
    assert!(f.systems.is_empty());
    assert!((36..=44).contains(&f.tanks.len()), "{} tubs", f.tanks.len());
    let new = f.tanks.iter().filter(|t| (today() - t.set_up).num_days() <= 30).count();
    assert!(new >= 3, "{new} tubs set up in the last month");
    let keys: Vec<&str> = f.species.iter().map(|s| s.key.as_str()).collect();
    for livebearer_or_cichlid in ["guppy", "platy", "swordtail", "zebra", "convict"] {
        assert!(keys.contains(&livebearer_or_cichlid), "{livebearer_or_cichlid}");
    }
    // Gallons in the file, litres in the model: a 100 US gal tub is 378.54 L (exact definition).
    let t1 = f.tank("T-01").unwrap();
    assert!((t1.volume_l - 378.541_178_4).abs() < 1e-9);
    assert_eq!(f.room.round_order, RoundOrder::AsListed);
    // The pH pen comes first here, temperature beside it; alkalinity is offered for the rift-lake tubs.
    let order = f.field_order(t1);
    assert_eq!(
        order.routine,
        [ReadingField::Ph, ReadingField::Temperature, ReadingField::TotalAmmonia, ReadingField::Nitrite]
    );
    assert_eq!(order.optional, [ReadingField::Nitrate, ReadingField::Alkalinity, ReadingField::Salinity]);
}

#[test]
fn marine_room_has_two_systems_near_33_g_per_l() {
    let f = load("saltmarsh-marine.toml");
    assert_eq!(f.systems.len(), 2);
    for system in &f.systems {
        assert_eq!(system.water_type, WaterType::Marine);
        assert!((32.0..=34.0).contains(&system.salinity_g_l), "{}", system.salinity_g_l);
    }
    assert!(f.tanks.iter().all(|t| t.is_on_system() && f.salinity_g_l(t) > 30.0));
    assert!(f.species.iter().all(|s| s.water_type == WaterType::Marine));
}

/// True when a comment line or trailing comment says where a number comes from.
fn marks_its_source(comment: &str) -> bool {
    let c = comment.to_lowercase();
    c.contains("from memory") || c.contains("no source") || c.chars().filter(char::is_ascii_digit).count() >= 4
}

#[test]
fn every_species_number_says_where_it_comes_from() {
    for path in sample_files() {
        let text = std::fs::read_to_string(&path).unwrap();
        let mut in_species = false;
        let mut comment_above = String::new();
        for (i, line) in text.lines().enumerate() {
            let trimmed = line.trim();
            if trimmed.starts_with('[') {
                in_species = trimmed == "[[species]]";
            }
            if let Some(comment) = trimmed.strip_prefix('#') {
                comment_above.push_str(comment);
                continue;
            }
            let (code, trailing) = trimmed.split_once('#').unwrap_or((trimmed, ""));
            let numeric = code.split_once('=').is_some_and(|(_, v)| v.chars().any(|c| c.is_ascii_digit()))
                && !code.trim_start().starts_with("name")
                && !code.trim_start().starts_with("notes");
            if in_species && numeric {
                assert!(
                    marks_its_source(trailing) || marks_its_source(&comment_above),
                    "{}:{}: a species number without its source: {line}",
                    path.display(),
                    i + 1
                );
            }
            comment_above.clear();
        }
    }
}

#[test]
fn broken_fixture_reports_every_planted_error_on_its_line() {
    let path = Path::new(env!("CARGO_MANIFEST_DIR")).join("tests/fixtures/broken-room.toml");
    let text = std::fs::read_to_string(&path).unwrap();
    let planted: Vec<usize> =
        text.lines().enumerate().filter(|(_, l)| l.contains("# ERROR:")).map(|(i, _)| i + 1).collect();
    let errors = match Facility::load(&path) {
        Err(tankwalk::model::LoadError::Invalid(e)) => e.errors,
        other => panic!("expected errors, got {other:?}"),
    };
    let lines: Vec<usize> = errors.iter().map(|e| e.line).collect();
    assert_eq!(lines, planted, "{}", errors.iter().map(|e| format!("{e}\n")).collect::<String>());
    let expected = [
        "round_order names 'FISH-3', which is neither a system nor a tank (did you mean 'FISH-1'?)",
        "species 'chromis': temperature range is reversed",
        "system 'FISH-2' holds 300 L in all, less than",
        "tank 'S-01' is on two systems",
        "tank 'S-05': unknown species 'yelowtang' (did you mean 'yellowtang'?)",
        "tank 'N-03': volume must be a number above 0",
        "'mbuna' is a freshwater species",
        "tank 'N-05': unknown field 'stock'",
        "duplicate id 'S-10'",
    ];
    for (e, needle) in errors.iter().zip(expected) {
        assert!(e.message.contains(needle), "{needle:?} not in {e}");
        assert_eq!(e.file, path);
    }
}

#[test]
fn the_documented_example_is_a_valid_room() {
    let doc = std::fs::read_to_string(Path::new(env!("CARGO_MANIFEST_DIR")).join("docs/facility-format.md")).unwrap();
    let (_, after) = doc.split_once("## A complete example").expect("the example section");
    let (_, block) = after.split_once("```toml\n").expect("a toml block");
    let (example, _) = block.split_once("```").expect("the end of the block");
    let checked = Facility::check(example, Path::new("example.toml"), Some(today())).unwrap_or_else(|e| panic!("{e}"));
    assert!(checked.warnings.is_empty(), "{:?}", checked.warnings);
    let f = checked.facility;
    // The mixed tank takes the corydoras' edges and the overlap of both temperature ranges.
    let d2 = f.effective_profile(f.tank("D-2").unwrap());
    assert_eq!(d2.band_edges.watch, 0.015);
    let t = d2.temp_c.unwrap();
    assert!((t.min - 22.222).abs() < 1e-3 && (t.max - 26.111).abs() < 1e-3, "{t:?}");
    // 29 US gal is 109.78 L; the source water's 0.2 mg/L as NH3 is 0.1645 mg/L as N.
    assert!((f.tank("Q-1").unwrap().volume_l - 109.777).abs() < 1e-3);
    let tan = f.room.source_water.as_ref().unwrap().tan_n_mg_l.unwrap();
    assert!((tan - 0.2 * 14.007 / 17.031).abs() < 1e-12);
    let round: Vec<&str> = f.round().iter().map(|t| t.id.as_str()).collect();
    assert_eq!(round, ["Q-1", "D-1", "D-2", "D-3"]);
    // pH first, then temperature and total ammonia; nitrite among the optional fields.
    let order = f.field_order(f.tank("Q-1").unwrap());
    assert_eq!(order.routine, [ReadingField::Ph, ReadingField::Temperature, ReadingField::TotalAmmonia]);
    assert_eq!(order.optional[..2], [ReadingField::Nitrite, ReadingField::Chloride]);
}
