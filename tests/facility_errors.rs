//! Every validation rule of the facility file: each case is a small file with one
//! mistake, marked `# <-` on the line the error must point at, and the words the
//! message must contain. Each case must give exactly that one error, so a
//! mistake never drags others in with it.

use std::path::Path;

use chrono::NaiveDate;
use tankwalk::model::{Facility, Problem, ReadingField, Severity};

const ROOM: &str = r#"[room]
name = "Test room"
kit_basis = "n"
"#;

const GUPPY: &str = r#"
[[species]]
key = "guppy"
name = "Guppy (Poecilia reticulata)"
water_type = "fresh"
temp_c = [22, 28]
ph = [7.0, 8.5]
salt_tolerance_g_l = 10
"#;

const NEON: &str = r#"
[[species]]
key = "neon"
name = "Neon tetra (Paracheirodon innesi)"
water_type = "fresh"
temp_c = [20, 26]
ph = [5.5, 7.5]
"#;

const CLOWN: &str = r#"
[[species]]
key = "clown"
name = "Ocellaris clownfish (Amphiprion ocellaris)"
water_type = "marine"
temp_c = [24, 28]
ph = [7.9, 8.4]
salt_tolerance_g_l = 38
"#;

const RACK: &str = r#"
[[systems]]
id = "RACK-A"
volume_l = 500
water_type = "fresh"
tanks = ["A-01", "A-02"]
"#;

const TANKS: &str = r#"
[[tanks]]
id = "A-01"
volume_l = 100
species = "guppy"
stock_count = 20
set_up = 2024-03-11

[[tanks]]
id = "A-02"
volume_l = 100
species = "guppy"
stock_count = 20
set_up = 2024-03-11
"#;

fn today() -> NaiveDate {
    NaiveDate::from_ymd_opt(2026, 12, 1).unwrap()
}

/// The problems of a file (errors when it fails, warnings when it loads).
fn problems(text: &str) -> (Vec<Problem>, Vec<Problem>) {
    match Facility::check(text, Path::new("room.toml"), Some(today())) {
        Ok(checked) => (Vec::new(), checked.warnings),
        Err(errors) => (errors.errors, Vec::new()),
    }
}

/// Line (from 1) of the only line marked `# <-`.
fn marked_line(text: &str) -> usize {
    let marked: Vec<usize> = text.lines().enumerate().filter(|(_, l)| l.contains("# <-")).map(|(i, _)| i + 1).collect();
    assert_eq!(marked.len(), 1, "mark exactly one line with # <- in\n{text}");
    marked[0]
}

/// The file must fail with exactly one error, on the marked line, saying `needle`.
#[track_caller]
fn one_error(text: &str, needle: &str) -> Problem {
    let (errors, _) = problems(text);
    assert_eq!(errors.len(), 1, "expected one error, got:\n{}", list(&errors));
    let e = &errors[0];
    assert_eq!(e.line, marked_line(text), "wrong line for {e}\nin\n{text}");
    assert!(e.message.contains(needle), "expected {needle:?} in {:?}", e.message);
    assert_eq!(e.severity, Severity::Error);
    assert!(e.to_string().starts_with(&format!("room.toml:{}:{}: ", e.line, e.column)));
    e.clone()
}

/// The file must load, with exactly one warning, on the marked line, saying `needle`.
#[track_caller]
fn one_warning(text: &str, needle: &str) {
    let (errors, warnings) = problems(text);
    assert!(errors.is_empty(), "expected no errors, got:\n{}", list(&errors));
    assert_eq!(warnings.len(), 1, "expected one warning, got:\n{}", list(&warnings));
    let w = &warnings[0];
    assert_eq!(w.line, marked_line(text), "wrong line for {w}");
    assert!(w.message.contains(needle), "expected {needle:?} in {:?}", w.message);
    assert!(w.to_string().contains(": warning: "));
}

fn list(problems: &[Problem]) -> String {
    problems.iter().map(|p| format!("  {p}\n")).collect()
}

#[test]
fn the_base_file_is_valid() {
    let (errors, warnings) = problems(&format!("{ROOM}{GUPPY}{RACK}{TANKS}"));
    assert!(errors.is_empty() && warnings.is_empty(), "{}{}", list(&errors), list(&warnings));
}

// ----- the file as a whole -----

#[test]
fn syntax_error() {
    let text = format!("{ROOM}{GUPPY}\n[[tanks]]\nid = \"A-01\nvolume_l = 100 # <-\n");
    let (errors, _) = problems(&text);
    assert!(!errors.is_empty());
    assert!(errors[0].message.starts_with("not valid TOML"), "{}", list(&errors));
}

#[test]
fn unknown_section() {
    let text = format!("{ROOM}{GUPPY}{RACK}{TANKS}\n[[tank]] # <-\nid = \"X\"\n");
    one_error(&text, "unknown section 'tank' (did you mean 'tanks'?)");
}

#[test]
fn missing_room() {
    let text = format!("# <- a file without a room\n{GUPPY}{RACK}{TANKS}");
    one_error(&text, "missing [room]");
}

#[test]
fn no_tanks() {
    let text = format!("{ROOM}{GUPPY}\n# <- nothing more");
    one_error(&text, "the file has no [[tanks]]");
}

// ----- the room -----

#[test]
fn missing_kit_basis() {
    let text = "[room] # <-\nname = \"Test room\"\n".to_string() + GUPPY + RACK + TANKS;
    one_error(&text, "missing field 'kit_basis'");
}

#[test]
fn unknown_kit_basis() {
    let text = "[room]\nname = \"Test room\"\nkit_basis = \"ppm\" # <-\n".to_string() + GUPPY + RACK + TANKS;
    one_error(&text, "'ppm' is not an ammonia basis (use n, nh3 or nh4)");
}

#[test]
fn elevation_out_of_range() {
    let text = format!("{ROOM}elevation_m = 9000 # <-\n{GUPPY}{RACK}{TANKS}");
    one_error(&text, "elevation 9000 m is outside the allowed range");
}

#[test]
fn unknown_temperature_unit() {
    let text = format!("{ROOM}temperature_unit = \"K\" # <-\n{GUPPY}{RACK}{TANKS}");
    one_error(&text, "'K' is not a temperature_unit; use \"C\" or \"F\"");
}

#[test]
fn zero_round_interval() {
    let text = format!("{ROOM}round_interval_hours = 0 # <-\n{GUPPY}{RACK}{TANKS}");
    one_error(&text, "round_interval_hours must be at least 1");
}

#[test]
fn source_water_ph_out_of_range() {
    let text = format!("{ROOM}\n[room.source_water]\nph = 15 # <-\n{GUPPY}{RACK}{TANKS}");
    one_error(&text, "pH 15 is outside the allowed range 0–14");
}

#[test]
fn source_water_ammonia_given_twice() {
    let text = format!("{ROOM}\n[room.source_water]\ntan_n_mg_l = 0.1\ntan_mg_l = 0.2 # <-\n{GUPPY}{RACK}{TANKS}");
    one_error(&text, "give tan_n_mg_l or tan_mg_l, not both");
}

// ----- unknown fields and wrong types -----

#[test]
fn unknown_field_is_named_with_a_suggestion() {
    let text = format!("{ROOM}{GUPPY}{RACK}{TANKS}\n[[tanks]]\nid = \"Q-1\"\nvolum_l = 60 # <-\n");
    let e = one_error(&text, "unknown field 'volum_l' (did you mean 'volume_l'?)");
    assert_eq!(e.field, "tanks[2].volum_l");
    assert_eq!(e.column, 1);
}

#[test]
fn unknown_field_in_room() {
    let text = format!("{ROOM}lead = \"Tomasz\" # <-\n{GUPPY}{RACK}{TANKS}");
    one_error(&text, "unknown field 'lead'");
}

#[test]
fn wrong_type() {
    let text = TANKS.replacen("volume_l = 100", "volume_l = \"big\" # <-", 1);
    let e = one_error(&format!("{ROOM}{GUPPY}{RACK}{text}"), "'volume_l' must be a number, not string \"big\"");
    assert_eq!(e.field, "tanks[0].volume_l");
    assert_eq!(e.column, 12);
    assert!(e.message.starts_with("tank 'A-01': "), "{}", e.message);
}

#[test]
fn negative_stock_count() {
    let text = TANKS.replacen("stock_count = 20", "stock_count = -3 # <-", 1);
    one_error(&format!("{ROOM}{GUPPY}{RACK}{text}"), "'stock_count' must be a whole number, 0 or more");
}

#[test]
fn missing_required_field() {
    let text =
        format!("{ROOM}{GUPPY}{RACK}{TANKS}\n[[tanks]] # <-\nid = \"Q-1\"\nvolume_l = 60\nspecies = \"guppy\"\n");
    one_error(&text, "missing field 'set_up' (the day the tank was filled, like 2024-03-11)");
}

// ----- ids -----

#[test]
fn id_with_a_space() {
    let text = TANKS.replacen("id = \"A-02\"", "id = \"A 02\" # <-", 1);
    let text = format!("{ROOM}{GUPPY}{}{text}", RACK.replace("\"A-02\"", "\"A-01\"").replace(", \"A-01\"]", "]"));
    one_error(&text, "tank id: 'A 02' has a space");
}

#[test]
fn duplicate_tank_id() {
    let text = format!("{ROOM}{GUPPY}{RACK}{TANKS}{}", TANKS.replacen("id = \"A-01\"", "id = \"a-01\" # <-", 1));
    let text = text.replacen("id = \"A-02\"", "id = \"A-03\"", 2).replacen("id = \"A-03\"", "id = \"A-02\"", 1);
    one_error(&text, "duplicate id 'a-01': the tank on line");
}

#[test]
fn duplicate_system_id() {
    let second = "\n[[systems]]\nid = \"RACK-A\" # <-\nvolume_l = 500\nwater_type = \"fresh\"\n";
    one_error(&format!("{ROOM}{GUPPY}{RACK}{second}{TANKS}"), "duplicate id 'RACK-A': the system on line 14");
}

#[test]
fn tank_and_system_share_an_id() {
    let tank = "\n[[tanks]]\nid = \"RACK-A\" # <-\nvolume_l = 60\nspecies = \"guppy\"\nset_up = 2024-01-01\n";
    one_error(&format!("{ROOM}{GUPPY}{RACK}{TANKS}{tank}"), "duplicate id 'RACK-A': the system on line");
}

#[test]
fn duplicate_species_key() {
    let again = GUPPY.replacen("key = \"guppy\"", "key = \"Guppy\" # <-", 1);
    one_error(&format!("{ROOM}{GUPPY}{again}{RACK}{TANKS}"), "duplicate species key 'Guppy': already used on line 6");
}

// ----- species -----

#[test]
fn unknown_species_key() {
    let text = TANKS.replacen("species = \"guppy\"", "species = \"guppie\" # <-", 1);
    let e = one_error(
        &format!("{ROOM}{GUPPY}{RACK}{text}"),
        "tank 'A-01': unknown species 'guppie' (did you mean 'guppy'?)",
    );
    assert_eq!(e.field, "tanks[0].species");
}

#[test]
fn unknown_species_in_a_mixed_list() {
    let text = TANKS.replacen("species = \"guppy\"", "species = [\"guppy\",\n  \"zebra\"] # <-", 1);
    let e = one_error(&format!("{ROOM}{GUPPY}{RACK}{text}"), "unknown species 'zebra'; known: guppy");
    assert_eq!(e.field, "tanks[0].species[1]");
}

#[test]
fn reversed_temperature_range() {
    let g = GUPPY.replace("temp_c = [22, 28]", "temp_c = [28, 22] # <-");
    one_error(&format!("{ROOM}{g}{RACK}{TANKS}"), "species 'guppy': temperature range is reversed: 28 is above 22");
}

#[test]
fn reversed_ph_range() {
    let g = GUPPY.replace("ph = [7.0, 8.5]", "ph = [8.5, 7.0] # <-");
    one_error(&format!("{ROOM}{g}{RACK}{TANKS}"), "pH range is reversed: 8.5 is above 7");
}

#[test]
fn range_needs_two_numbers() {
    let g = GUPPY.replace("ph = [7.0, 8.5]", "ph = [7.0] # <-");
    one_error(&format!("{ROOM}{g}{RACK}{TANKS}"), "ph must be two numbers, [low, high]; found 1");
}

#[test]
fn temperature_outside_what_the_equations_cover() {
    let g = GUPPY.replace("temp_c = [22, 28]", "temp_c = [22, 45] # <-");
    one_error(&format!("{ROOM}{g}{RACK}{TANKS}"), "temperature 45 °C is outside the allowed range 0–40 °C");
}

#[test]
fn fahrenheit_ranges_are_read_as_fahrenheit() {
    let g = GUPPY.replace("temp_c = [22, 28]", "temp_f = [72, 120] # <-");
    one_error(&format!("{ROOM}{g}{RACK}{TANKS}"), "temperature 48.88");
}

#[test]
fn marine_species_needs_salt_tolerance() {
    let c = CLOWN
        .replace("salt_tolerance_g_l = 38\n", "")
        .replace("water_type = \"marine\"", "water_type = \"marine\" # <-");
    one_error(&format!("{ROOM}{GUPPY}{c}{RACK}{TANKS}"), "a marine species needs salt_tolerance_g_l");
}

#[test]
fn band_edges_not_increasing() {
    let g = format!("{GUPPY}band_edges = {{ basis = \"nh3-n\", watch = 0.05, act = 0.02, critical = 0.2 }} # <-\n");
    one_error(
        &format!("{ROOM}{g}{RACK}{TANKS}"),
        "band edges must rise from watch to act to critical; here watch 0.05, act 0.02, critical 0.2",
    );
}

#[test]
fn band_edge_not_positive() {
    let g = format!("{GUPPY}band_edges = {{ basis = \"nh3\", watch = 0, act = 0.06, critical = 0.24 }} # <-\n");
    one_error(&format!("{ROOM}{g}{RACK}{TANKS}"), "band edge watch must be more than 0");
}

#[test]
fn band_edges_need_a_basis() {
    let g = format!("{GUPPY}band_edges = {{ basis = \"ppm\", watch = 0.02, act = 0.05, critical = 0.2 }} # <-\n");
    one_error(&format!("{ROOM}{g}{RACK}{TANKS}"), "band edge basis 'ppm' is not known");
}

#[test]
fn band_edges_given_as_nh3_are_stored_as_nh3_n() {
    let g = format!("{GUPPY}band_edges = {{ basis = \"nh3\", watch = 0.0243, act = 0.0607, critical = 0.243 }}\n");
    let f = Facility::parse(&format!("{ROOM}{g}{RACK}{TANKS}"), Path::new("room.toml")).unwrap();
    let e = f.species[0].band_edges.unwrap();
    // mg NH3 per mg NH3-N = 17.031 / 14.007 (IUPAC conventional atomic weights).
    assert!((e.watch - 0.0243 * 14.007 / 17.031).abs() < 1e-12);
}

// ----- volumes -----

#[test]
fn tank_volume_not_positive() {
    let text = TANKS.replacen("volume_l = 100", "volume_l = 0 # <-", 1);
    one_error(&format!("{ROOM}{GUPPY}{RACK}{text}"), "tank 'A-01': volume must be a number above 0, not 0");
}

#[test]
fn system_volume_not_positive() {
    let r = RACK.replace("volume_l = 500", "volume_l = -500 # <-");
    one_error(&format!("{ROOM}{GUPPY}{r}{TANKS}"), "system 'RACK-A': volume must be a number above 0, not -500");
}

#[test]
fn volume_given_twice() {
    let text = TANKS.replacen("volume_l = 100", "volume_l = 100\nvolume_gal = 26 # <-", 1);
    one_error(&format!("{ROOM}{GUPPY}{RACK}{text}"), "give volume_l or volume_gal, not both");
}

#[test]
fn volume_missing() {
    let text =
        format!("{ROOM}{GUPPY}{RACK}{TANKS}\n[[tanks]] # <-\nid = \"Q-1\"\nspecies = \"guppy\"\nset_up = 2024-01-01\n");
    one_error(&text, "tank 'Q-1': missing field 'volume_l' (or 'volume_gal')");
}

#[test]
fn system_smaller_than_its_tanks() {
    let r = RACK.replace("volume_l = 500", "volume_l = 150 # <-");
    one_error(
        &format!("{ROOM}{GUPPY}{r}{TANKS}"),
        "system 'RACK-A' holds 150 L in all, less than the 200 L of its 2 tanks",
    );
}

#[test]
fn system_smaller_than_its_tanks_in_gallons() {
    let room = format!("{ROOM}volume_unit = \"gal\"\n");
    let r = RACK.replace("volume_l = 500", "volume_gal = 40 # <-");
    one_error(&format!("{room}{GUPPY}{r}{TANKS}"), "holds 40 US gal in all, less than the 52.83 US gal of its 2 tanks");
}

// ----- systems and membership -----

#[test]
fn tank_listed_under_two_systems() {
    let second = "\n[[systems]]\nid = \"RACK-B\"\nvolume_l = 500\nwater_type = \"fresh\"\ntanks = [\"A-02\"] # <-\n";
    one_error(
        &format!("{ROOM}{GUPPY}{RACK}{second}{TANKS}"),
        "tank 'A-02' is on two systems: listed under system 'RACK-A' on line",
    );
}

#[test]
fn tank_listed_under_one_system_and_naming_another() {
    let second = "\n[[systems]]\nid = \"RACK-B\"\nvolume_l = 500\nwater_type = \"fresh\"\n";
    let t = TANKS.replacen("species = \"guppy\"", "system = \"RACK-B\" # <-\nspecies = \"guppy\"", 1);
    one_error(
        &format!("{ROOM}{GUPPY}{RACK}{second}{t}"),
        "tank 'A-01' is on two systems: it says system 'RACK-B' here, but system 'RACK-A' lists it on line",
    );
}

#[test]
fn tank_listed_twice_by_one_system() {
    let r = RACK.replace("tanks = [\"A-01\", \"A-02\"]", "tanks = [\"A-01\", \"A-02\",\n  \"A-01\"] # <-");
    one_error(&format!("{ROOM}{GUPPY}{r}{TANKS}"), "system 'RACK-A' lists tank 'A-01' twice");
}

#[test]
fn system_lists_an_unknown_tank() {
    let r = RACK.replace("tanks = [\"A-01\", \"A-02\"]", "tanks = [\"A-01\", \"A-02\",\n  \"A-03\"] # <-");
    one_error(
        &format!("{ROOM}{GUPPY}{r}{TANKS}"),
        "system 'RACK-A' lists tank 'A-03', but no [[tanks]] entry has that id",
    );
}

#[test]
fn tank_names_an_unknown_system() {
    let t = "\n[[tanks]]\nid = \"Q-1\"\nvolume_l = 60\nsystem = \"RACK-Z\" # <-\nspecies = \"guppy\"\nset_up = 2024-01-01\n";
    one_error(&format!("{ROOM}{GUPPY}{RACK}{TANKS}{t}"), "tank 'Q-1' names system 'RACK-Z', which is not defined");
}

#[test]
fn tank_on_a_system_states_other_water() {
    let t = TANKS.replacen("species = \"guppy\"", "water_type = \"marine\" # <-\nspecies = \"guppy\"", 1);
    one_error(
        &format!("{ROOM}{GUPPY}{RACK}{t}"),
        "tank 'A-01' is on system 'RACK-A', which holds fresh water, but its water_type says marine",
    );
}

#[test]
fn tank_on_a_system_states_other_salinity() {
    let t = TANKS.replacen("species = \"guppy\"", "salinity_g_l = 3 # <-\nspecies = \"guppy\"", 1);
    one_error(&format!("{ROOM}{GUPPY}{RACK}{t}"), "run at 0 g/L, but its salinity_g_l says 3");
}

#[test]
fn system_with_no_tanks_is_a_warning() {
    let empty = "\n[[systems]]\nid = \"RACK-B\" # <-\nvolume_l = 500\nwater_type = \"fresh\"\n";
    one_warning(&format!("{ROOM}{GUPPY}{RACK}{empty}{TANKS}"), "system 'RACK-B' has no tanks");
}

// ----- water and species -----

#[test]
fn marine_species_in_a_freshwater_system() {
    let t = TANKS.replacen("species = \"guppy\"", "species = \"clown\" # <-", 1);
    one_error(
        &format!("{ROOM}{GUPPY}{CLOWN}{RACK}{t}"),
        "tank 'A-01' holds fresh water (system 'RACK-A'), but 'clown' is a marine species",
    );
}

#[test]
fn freshwater_species_in_a_marine_system() {
    let r = RACK.replace("water_type = \"fresh\"", "water_type = \"marine\"\nsalinity_g_l = 33");
    let t = TANKS.replace("species = \"guppy\"", "species = \"clown\"").replacen(
        "species = \"clown\"",
        "species = \"neon\" # <-",
        1,
    );
    one_error(
        &format!("{ROOM}{NEON}{CLOWN}{r}{t}"),
        "tank 'A-01' holds marine water (system 'RACK-A'), but 'neon' is a freshwater species",
    );
}

#[test]
fn salt_above_what_a_species_tolerates() {
    let t = "\n[[tanks]]\nid = \"Q-1\"\nvolume_l = 60\nwater_type = \"fresh\"\nsalinity_g_l = 3\nspecies = \"neon\" # <-\nset_up = 2024-01-01\n";
    one_error(
        &format!("{ROOM}{GUPPY}{NEON}{RACK}{TANKS}{t}"),
        "tank 'Q-1' is run at 3 g/L, above the 0 g/L that 'neon' tolerates",
    );
}

#[test]
fn marine_water_needs_a_salinity() {
    let r = RACK.replace("water_type = \"fresh\"", "water_type = \"marine\" # <-");
    let t = TANKS.replace("\"guppy\"", "\"clown\"");
    one_error(&format!("{ROOM}{CLOWN}{r}{t}"), "marine water needs salinity_g_l");
}

#[test]
fn unusual_salinity_is_a_warning() {
    let r = RACK.replace("water_type = \"fresh\"", "water_type = \"marine\"\nsalinity_g_l = 15 # <-");
    let t = TANKS.replace("\"guppy\"", "\"clown\"");
    one_warning(&format!("{ROOM}{CLOWN}{r}{t}"), "marine water at 15 g/L is low");
}

#[test]
fn mixed_tank_with_no_common_temperature() {
    let warm = GUPPY.replace("key = \"guppy\"", "key = \"discus\"").replace("temp_c = [22, 28]", "temp_c = [28, 31]");
    let cold = NEON.replace("temp_c = [20, 26]", "temp_c = [18, 24]").replace("ph = [5.5, 7.5]", "ph = [7.0, 8.0]");
    let t = TANKS.replacen("species = \"guppy\"", "species = [\"discus\", \"neon\"] # <-", 1);
    one_error(
        &format!("{ROOM}{GUPPY}{warm}{cold}{RACK}{t}"),
        "tank 'A-01': no temperature suits all its species: 'discus' 28–31 °C, 'neon' 18–24 °C",
    );
}

#[test]
fn mixed_tank_with_no_common_ph() {
    let hard = GUPPY.replace("key = \"guppy\"", "key = \"zebra\"").replace("ph = [7.0, 8.5]", "ph = [7.8, 8.6]");
    let t = TANKS.replacen("species = \"guppy\"", "species = [\"zebra\", \"neon\"] # <-", 1);
    one_error(
        &format!("{ROOM}{GUPPY}{hard}{NEON}{RACK}{t}"),
        "no pH suits all its species: 'zebra' 7.8–8.6, 'neon' 5.5–7.5",
    );
}

#[test]
fn species_listed_twice_in_a_tank() {
    let t = TANKS.replacen("species = \"guppy\"", "species = [\"guppy\",\n  \"guppy\"] # <-", 1);
    one_error(&format!("{ROOM}{GUPPY}{RACK}{t}"), "species 'guppy' is listed twice");
}

#[test]
fn animals_without_species() {
    let t = "\n[[tanks]]\nid = \"Q-1\"\nvolume_l = 60\nwater_type = \"fresh\"\nstock_count = 12 # <-\nset_up = 2024-01-01\n";
    one_error(&format!("{ROOM}{GUPPY}{RACK}{TANKS}{t}"), "tank 'Q-1' has 12 animals but no species");
}

#[test]
fn standalone_empty_tank_needs_a_water_type() {
    let t = "\n[[tanks]] # <-\nid = \"Q-1\"\nvolume_l = 60\nset_up = 2024-01-01\n";
    one_error(
        &format!("{ROOM}{GUPPY}{RACK}{TANKS}{t}"),
        "tank 'Q-1' is standalone and has no species: state its water_type",
    );
}

// ----- dates -----

#[test]
fn set_up_that_is_not_a_date() {
    let t = TANKS.replacen("set_up = 2024-03-11", "set_up = \"March 11\" # <-", 1);
    one_error(&format!("{ROOM}{GUPPY}{RACK}{t}"), "set_up 'March 11' is not a date; write the day like 2024-03-11");
}

#[test]
fn set_up_with_a_time_of_day() {
    let t = TANKS.replacen("set_up = 2024-03-11", "set_up = 2024-03-11T08:00:00 # <-", 1);
    one_error(&format!("{ROOM}{GUPPY}{RACK}{t}"), "is not a date");
}

#[test]
fn set_up_as_quoted_text_is_accepted() {
    let t = TANKS.replacen("set_up = 2024-03-11", "set_up = \"2024-03-11\"", 1);
    let f = Facility::parse(&format!("{ROOM}{GUPPY}{RACK}{t}"), Path::new("room.toml")).unwrap();
    assert_eq!(f.tanks[0].set_up, NaiveDate::from_ymd_opt(2024, 3, 11).unwrap());
}

#[test]
fn set_up_in_the_future_is_a_warning() {
    let t = TANKS.replacen("set_up = 2024-03-11", "set_up = 2027-01-05 # <-", 1);
    one_warning(
        &format!("{ROOM}{GUPPY}{RACK}{t}"),
        "tank 'A-01' was set up on 2027-01-05, which is after today (2026-12-01)",
    );
    // Without a date for today there is nothing to compare with.
    assert!(Facility::parse(&format!("{ROOM}{GUPPY}{RACK}{t}"), Path::new("room.toml")).is_ok());
}

// ----- round order -----

#[test]
fn round_order_names_an_unknown_id() {
    let room = format!("{ROOM}round_order = [\"RACK-A\",\n  \"RACK-B\"] # <-\n");
    one_error(
        &format!("{room}{GUPPY}{RACK}{TANKS}"),
        "round_order names 'RACK-B', which is neither a system nor a tank",
    );
}

#[test]
fn round_order_reaches_a_tank_twice() {
    let room = format!("{ROOM}round_order = [\"RACK-A\",\n  \"A-02\"] # <-\n");
    one_error(
        &format!("{room}{GUPPY}{RACK}{TANKS}"),
        "round_order reaches tank 'A-02' a second time here: system 'RACK-A', named earlier, includes it",
    );
}

#[test]
fn round_order_word_must_be_known() {
    let room = format!("{ROOM}round_order = \"by rack\" # <-\n");
    one_error(&format!("{room}{GUPPY}{RACK}{TANKS}"), "round_order 'by rack' is not known");
}

#[test]
fn round_order_that_misses_tanks_is_a_warning() {
    let room = format!("{ROOM}round_order = [\"A-02\"] # <-\n");
    one_warning(&format!("{room}{GUPPY}{RACK}{TANKS}"), "round_order does not reach A-01: walked last");
}

// ----- the walk's fields -----

#[test]
fn reading_fields_set_the_walks_order_and_the_rest_keep_their_defaults() {
    let room = format!("{ROOM}reading_fields = [\"ph\", \"temperature\", \"total-ammonia\"]\n");
    let f = Facility::parse(&format!("{room}{GUPPY}{RACK}{TANKS}"), Path::new("room.toml")).unwrap();
    let order = f.field_order(&f.tanks[0]);
    assert_eq!(order.routine, [ReadingField::Ph, ReadingField::Temperature, ReadingField::TotalAmmonia]);
    // Not listed, nitrite is not asked for; the optional fields are the defaults.
    assert_eq!(order.optional, [ReadingField::Nitrate, ReadingField::Salinity, ReadingField::DissolvedOxygen]);
}

#[test]
fn names_of_fields_ignore_case_and_take_underscores() {
    let room = format!(
        "{ROOM}reading_fields = [\"Temperature\", \"pH\", \"total_ammonia\"]\noptional_fields = [\"Dissolved Oxygen\"]\n"
    );
    let f = Facility::parse(&format!("{room}{GUPPY}{RACK}{TANKS}"), Path::new("room.toml")).unwrap();
    assert_eq!(f.room.optional_fields, Some(vec![ReadingField::DissolvedOxygen]));
}

#[test]
fn unknown_reading_field() {
    let room = format!("{ROOM}reading_fields = [\"temperature\", \"ph\", \"total-amonia\"] # <-\n");
    let e = one_error(
        &format!("{room}{GUPPY}{RACK}{TANKS}"),
        "reading_fields names 'total-amonia', which is not a reading field (did you mean 'total-ammonia'?)",
    );
    assert_eq!(e.field, "room.reading_fields[2]");
    assert_eq!(e.column, 40);
}

#[test]
fn unknown_optional_field_lists_the_known_ones() {
    let room = format!("{ROOM}optional_fields = [\n  \"nitrate\",\n  \"hardness\", # <-\n]\n");
    one_error(
        &format!("{room}{GUPPY}{RACK}{TANKS}"),
        "optional_fields names 'hardness', which is not a reading field; the walk takes temperature, ph, total-ammonia",
    );
}

#[test]
fn reading_field_listed_twice() {
    let room = format!("{ROOM}reading_fields = [\"temperature\", \"ph\",\n  \"total-ammonia\", \"PH\"] # <-\n");
    one_error(
        &format!("{room}{GUPPY}{RACK}{TANKS}"),
        "'PH' is listed twice in reading_fields (first on line 4); each field is read once",
    );
}

#[test]
fn reading_field_in_both_lists() {
    let room = format!(
        "{ROOM}reading_fields = [\"temperature\", \"ph\", \"total-ammonia\", \"nitrite\"]\noptional_fields = [\"nitrate\", \"nitrite\"] # <-\n"
    );
    one_error(
        &format!("{room}{GUPPY}{RACK}{TANKS}"),
        "'nitrite' is in both reading_fields (line 4) and optional_fields; a field is read every time or is optional",
    );
}

#[test]
fn reading_fields_without_what_nh3_needs() {
    let room = format!("{ROOM}reading_fields = [\"temperature\", \"nitrite\"] # <-\n");
    one_error(
        &format!("{room}{GUPPY}{RACK}{TANKS}"),
        "reading_fields leaves out ph and total-ammonia: NH3 cannot be computed without temperature, pH and total ammonia",
    );
    // Optional, they are still there to type: that is allowed.
    let room = format!(
        "{ROOM}reading_fields = [\"temperature\", \"nitrite\"]\noptional_fields = [\"ph\", \"total-ammonia\"]\n"
    );
    let (errors, warnings) = problems(&format!("{room}{GUPPY}{RACK}{TANKS}"));
    assert!(errors.is_empty() && warnings.is_empty(), "{}{}", list(&errors), list(&warnings));
}

#[test]
fn empty_reading_fields() {
    let room =
        format!("{ROOM}reading_fields = [] # <-\noptional_fields = [\"temperature\", \"ph\", \"total-ammonia\"]\n");
    one_error(&format!("{room}{GUPPY}{RACK}{TANKS}"), "reading_fields is empty; list the fields read at every tank");
}

#[test]
fn reading_fields_must_be_a_list() {
    let room = format!("{ROOM}reading_fields = \"ph\" # <-\n");
    one_error(&format!("{room}{GUPPY}{RACK}{TANKS}"), "'reading_fields' must be a list in [ ], not string");
}

// ----- many at once -----

#[test]
fn every_error_is_reported_in_file_order() {
    let g = GUPPY.replace("temp_c = [22, 28]", "temp_c = [28, 22]");
    let r = RACK.replace("volume_l = 500", "volume_l = 0");
    let t = TANKS.replacen("species = \"guppy\"", "species = \"guppie\"", 1).replacen(
        "volume_l = 100",
        "volume_l = \"x\"",
        1,
    );
    let (errors, _) = problems(&format!("{ROOM}{g}{r}{t}"));
    let lines: Vec<usize> = errors.iter().map(|e| e.line).collect();
    assert_eq!(lines, [9, 15, 21], "{}", list(&errors));
    let mut sorted = lines.clone();
    sorted.sort();
    assert_eq!(lines, sorted);
}

#[test]
fn duplicate_key_is_named() {
    let text =
        "[room]\nname = \"Test room\"\nname = \"Again\" # <-\nkit_basis = \"n\"\n".to_string() + GUPPY + RACK + TANKS;
    one_error(&text, "not valid TOML: duplicate key 'name' (a key may appear once in each table)");
}

#[test]
fn a_list_written_as_one_table_is_explained() {
    let guppy = GUPPY.replace("[[species]]", "[species] # <-");
    one_error(
        &format!("{ROOM}{guppy}{RACK}{TANKS}"),
        "'species' must be a list of tables: write each entry as [[species]]",
    );
}
