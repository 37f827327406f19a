//! The walk as pure state transitions: keys in (through the default keymap),
//! state and effects out. No terminal, no store: saves are answered here the
//! way `run.rs` answers them.

use chrono::{DateTime, Duration, FixedOffset, TimeZone};
use tankwalk::core::band::Band;
use tankwalk::core::units::{AmmoniaBasis, NitrogenIonBasis};
use tankwalk::model::facility::Facility;
use tankwalk::model::record::{
    DeviceId, Measurements, NitrogenReading, Reading, Record, RecordBody, Target, Temperature, TotalAmmonia,
};
use tankwalk::tui::keymap::{Key, Keymap};
use tankwalk::tui::state::field::{FieldKind, Provenance};
use tankwalk::tui::state::modal::Modal;
use tankwalk::tui::state::round::Due;
use tankwalk::tui::state::{App, Effect, Input, Screen, SessionInfo, StatusKind, update};
use ulid::Ulid;

const ROOM: &str = r#"
[room]
name = "Test bench"
elevation_m = 0
kit_basis = "n"
round_order = ["RACK", "T-1", "T-2"]

[room.source_water]
ph = 7.8

[[species]]
key = "guppy"
name = "Guppy (Poecilia reticulata)"
water_type = "fresh"
temp_c = [22, 28]
ph = [7.0, 8.5]
salt_tolerance_g_l = 10

[[systems]]
id = "RACK"
name = "Rack"
volume_l = 500
water_type = "fresh"
tanks = ["R-1", "R-2", "R-3"]

[[tanks]]
id = "R-1"
volume_l = 100
species = "guppy"
stock_count = 20
set_up = 2024-01-01

[[tanks]]
id = "R-2"
volume_l = 100
species = "guppy"
stock_count = 20
set_up = 2024-01-01

[[tanks]]
id = "R-3"
volume_l = 100
species = "guppy"
stock_count = 20
set_up = 2024-01-01

[[tanks]]
id = "T-1"
volume_l = 60
species = "guppy"
stock_count = 10
set_up = 2024-01-01

[[tanks]]
id = "T-2"
volume_l = 60
species = "guppy"
stock_count = 10
set_up = 2024-01-01
"#;

fn now() -> DateTime<FixedOffset> {
    FixedOffset::east_opt(3600).unwrap().with_ymd_and_hms(2026, 12, 1, 7, 40, 0).unwrap()
}

fn device() -> DeviceId {
    DeviceId(Ulid::from_parts(1, 1))
}

fn yesterday_reading(target: Target, ph: f64, tan: f64) -> Record {
    let mut reading = Reading::new(target);
    reading.measurements = Measurements {
        temperature: Some(Temperature::celsius(25.0)),
        ph: Some(ph),
        total_ammonia: Some(TotalAmmonia { value: tan, basis: tankwalk::core::units::AmmoniaBasis::N }),
        ..Measurements::default()
    };
    Record {
        id: Ulid::from_parts(1, u128::from(ph.to_bits()) ^ u128::from(tan.to_bits())),
        device: device(),
        operator: "Ines Okafor".into(),
        taken_at: now() - Duration::hours(24),
        body: RecordBody::Reading(reading),
    }
}

struct Walk {
    app: App,
    keymap: Keymap,
    saved: Vec<Record>,
    fail_saves: bool,
}

impl Walk {
    fn new() -> Walk {
        Walk::in_room(ROOM)
    }

    fn in_room(room: &str) -> Walk {
        Walk::with_records(room, Vec::new())
    }

    /// In `room`, with yesterday's readings and `records` stored.
    fn with_records(room: &str, records: Vec<Record>) -> Walk {
        let facility = Facility::parse(room, std::path::Path::new("test-bench.toml")).unwrap();
        let mut history = vec![
            yesterday_reading(Target::System("RACK".into()), 7.5, 0.2),
            yesterday_reading(Target::Tank("T-1".into()), 7.4, 0.3),
        ];
        history.extend(records);
        let app = App::new(
            facility,
            history,
            SessionInfo { operator: "Ines Okafor".into(), device: device(), id_seed: 7 },
            now(),
        );
        Walk { app, keymap: Keymap::default_map(), saved: Vec::new(), fail_saves: false }
    }

    /// Presses keys written as in keymap files; a word of digits types each digit.
    fn keys(&mut self, keys: &str) -> Vec<Effect> {
        let mut all = Vec::new();
        for word in keys.split(' ').filter(|w| !w.is_empty()) {
            let presses: Vec<Key> =
                if word.chars().all(|c| c.is_ascii_digit() || c == '.' || c == ',') && word.len() > 1 {
                    word.chars().map(Key::char).collect()
                } else {
                    vec![word.parse().unwrap()]
                };
            for key in presses {
                let effects = update(&mut self.app, &self.keymap, Input::Key(key), now());
                for effect in effects {
                    if let Effect::Save(records) = &effect {
                        let answer = if self.fail_saves {
                            Err("disk full".to_string())
                        } else {
                            self.saved.extend(records.iter().cloned());
                            Ok(records.clone())
                        };
                        update(&mut self.app, &self.keymap, Input::Saved(answer), now());
                    }
                    all.push(effect);
                }
            }
        }
        all
    }

    fn tank(&self) -> &str {
        let walk = self.app.walk.as_ref().expect("walking");
        self.app.tank(walk.entry.tank).id.as_str()
    }

    fn texts(&self) -> Vec<String> {
        self.app.walk.as_ref().unwrap().entry.fields.iter().map(|f| f.text.clone()).collect()
    }

    fn status(&self) -> (StatusKind, String) {
        let s = self.app.status.clone().expect("a status");
        (s.kind, s.text)
    }
}

fn reading_of(record: &Record) -> &Reading {
    record.body.as_reading().expect("a reading")
}

#[test]
fn the_first_rack_tank_saves_the_systems_water_and_the_next_ones_carry_it() {
    let mut w = Walk::new();
    w.keys("w");
    assert!(matches!(w.app.screen(), Screen::Walk));
    assert_eq!(w.tank(), "R-1");
    // Four readings, Enter between them, one key to save and go on.
    let effects = w.keys("25.5 enter 7.6 enter 0.4 enter 0.05 s");
    assert_eq!(effects.iter().filter(|e| matches!(e, Effect::Save(_))).count(), 1);
    assert_eq!(w.saved.len(), 1);
    let reading = reading_of(&w.saved[0]);
    assert_eq!(reading.target, Target::System("RACK".into()));
    assert_eq!(reading.measurements.ph, Some(7.6));
    assert_eq!(reading.measurements.tan_n_mg_l(), Some(0.4));
    assert_eq!(w.saved[0].operator, "Ines Okafor");
    assert_eq!(w.saved[0].taken_at, now());
    let (kind, text) = w.status();
    assert_eq!(kind, StatusKind::Success);
    assert!(text.starts_with("Saved: R-1 is on disk"), "{text}");

    // R-2 shows the system's water, carried, and the cursor waits past it.
    assert_eq!(w.tank(), "R-2");
    let entry = &w.app.walk.as_ref().unwrap().entry;
    assert!(matches!(entry.fields[1].provenance, Provenance::Carried(_)));
    assert_eq!(entry.fields[1].text, "7.6");
    assert!(entry.verdict.figures.is_some());
    // Nothing seen: save-and-next writes nothing and moves on.
    w.keys("s");
    assert_eq!(w.saved.len(), 1);
    assert_eq!(w.tank(), "R-3");
    // Fish gasping at R-3: a tank reading with the observation only.
    w.keys("g s");
    assert_eq!(w.saved.len(), 2);
    let reading = reading_of(&w.saved[1]);
    assert_eq!(reading.target, Target::Tank("R-3".into()));
    assert!(reading.observations.gasping);
    assert!(reading.measurements.is_empty());
    assert_eq!(w.tank(), "T-1");
    assert_eq!(w.app.statuses.iter().filter(|s| s.due == Due::Done).count(), 3);
}

#[test]
fn keep_previous_takes_the_last_value_and_moves_on() {
    let mut w = Walk::new();
    w.keys("w");
    w.keys("space space");
    assert_eq!(w.texts()[..2], ["25".to_string(), "7.5".to_string()]);
    assert_eq!(w.app.walk.as_ref().unwrap().entry.focus, 2);
    assert_eq!(w.app.walk.as_ref().unwrap().entry.fields[0].provenance, Provenance::Previous);
}

#[test]
fn a_bad_value_says_why_in_the_field_and_nothing_is_saved() {
    let mut w = Walk::new();
    w.keys("w 25 enter 15 enter 0.2");
    let entry = &w.app.walk.as_ref().unwrap().entry;
    assert_eq!(entry.fields[1].error(), Some("pH 15 is outside the allowed range 0–14"));
    let effects = w.keys("s");
    assert!(effects.is_empty());
    assert!(w.saved.is_empty());
    let (kind, text) = w.status();
    assert_eq!(kind, StatusKind::Error);
    assert!(text.starts_with("pH: pH 15 is outside"), "{text}");
    assert_eq!(w.app.walk.as_ref().unwrap().entry.focus, 1, "the cursor goes to the bad field");
    // A key that is not part of a number is refused by the field.
    w.keys("delete 7 . .");
    let field = &w.app.walk.as_ref().unwrap().entry.fields[1];
    assert_eq!(field.text, "7.");
    assert_eq!(field.refused.as_deref(), Some("one decimal point only"));
    // Fixed, it saves.
    w.keys("4 s");
    assert_eq!(w.saved.len(), 1);
}

#[test]
fn an_unbound_key_says_so_and_changes_nothing() {
    let mut w = Walk::new();
    w.keys("w 25");
    w.keys("z");
    assert_eq!(w.texts()[0], "25");
    assert_eq!(w.status().1, "'z' does nothing here; ? lists the keys");
}

#[test]
fn skipping_asks_a_reason_and_goes_on() {
    let mut w = Walk::new();
    w.keys("w");
    // Past the rack to T-1.
    w.keys("pagedown pagedown pagedown");
    assert_eq!(w.tank(), "T-1");
    w.keys("x");
    assert!(matches!(w.app.modal, Some(Modal::Pick(_))));
    w.keys("down enter");
    assert_eq!(w.tank(), "T-2");
    assert_eq!(w.status(), (StatusKind::Info, "Skipped T-1: fish being moved or treated".to_string()));
    let t1 = w.app.tank_index("T-1").unwrap();
    assert_eq!(w.app.statuses[t1].due, Due::Skipped);
    // The skip is a record, saved like a reading.
    assert_eq!(w.saved.len(), 1);
    let RecordBody::Skip(skip) = &w.saved[0].body else { panic!("a skip record") };
    assert_eq!(
        (skip.target.clone(), skip.reason.as_str()),
        (Target::Tank("T-1".into()), "fish being moved or treated")
    );
    // A typed reason.
    w.keys("x end enter");
    assert!(matches!(w.app.modal, Some(Modal::Prompt(_))));
    for c in "heater failed".chars() {
        update(&mut w.app, &w.keymap, Input::Key(Key::char(c)), now());
    }
    w.keys("enter");
    let RecordBody::Skip(skip) = &w.saved[1].body else { panic!("a skip record") };
    assert_eq!(skip.reason, "heater failed");
    // Reopened from the saved records (a restart mid-round), both tanks are still skipped.
    let reopened = App::new(
        w.app.facility.clone(),
        w.saved.clone(),
        SessionInfo { operator: "Ines Okafor".into(), device: device(), id_seed: 8 },
        now(),
    );
    let t2 = w.app.tank_index("T-2").unwrap();
    assert_eq!((reopened.statuses[t1].due, reopened.statuses[t2].due), (Due::Skipped, Due::Skipped));
}

#[test]
fn leaving_a_tank_with_typed_values_asks_first() {
    let mut w = Walk::new();
    w.keys("w 25 pagedown");
    assert!(matches!(w.app.modal, Some(Modal::Confirm(_))));
    w.keys("n");
    assert_eq!(w.tank(), "R-1");
    assert_eq!(w.texts()[0], "25");
    w.keys("pagedown y");
    assert_eq!(w.tank(), "R-2");
    assert!(w.saved.is_empty());
}

#[test]
fn quitting_with_an_unsaved_entry_asks_and_ctrl_c_twice_quits() {
    let mut w = Walk::new();
    w.keys("w 25");
    assert!(w.keys("q").is_empty());
    assert!(matches!(w.app.modal, Some(Modal::Confirm(_))));
    w.keys("esc");
    assert!(w.app.modal.is_none());
    assert_eq!(w.keys("ctrl-c ctrl-c"), [Effect::Quit]);
    // With nothing unsaved, quit is immediate.
    let mut w = Walk::new();
    assert_eq!(w.keys("q"), [Effect::Quit]);
}

#[test]
fn going_back_to_a_done_tank_shows_it_and_saves_a_correction() {
    let mut w = Walk::new();
    w.keys("w pagedown pagedown pagedown");
    assert_eq!(w.tank(), "T-1");
    w.keys("25 enter 7.2 enter 0.3 s");
    assert_eq!(w.saved.len(), 1);
    let original = w.saved[0].id;
    assert_eq!(w.tank(), "T-2");
    w.keys("pageup");
    assert_eq!(w.tank(), "T-1");
    let entry = &w.app.walk.as_ref().unwrap().entry;
    assert_eq!(entry.fields[1].text, "7.2");
    assert_eq!(entry.fields[1].provenance, Provenance::Saved);
    // Unchanged: save-and-next just moves on.
    w.keys("s");
    assert_eq!(w.saved.len(), 1);
    w.keys("pageup up up delete 7.3 s");
    // A reason is asked, with a suggestion Enter accepts.
    assert!(matches!(w.app.modal, Some(Modal::Prompt(_))));
    w.keys("enter");
    assert_eq!(w.saved.len(), 2);
    let RecordBody::Correction(correction) = &w.saved[1].body else { panic!("a correction") };
    assert_eq!(correction.supersedes, original);
    assert_eq!(correction.reason, "re-read at the tank");
    let replacement = correction.replacement.as_deref().and_then(RecordBody::as_reading).unwrap();
    assert_eq!(replacement.measurements.ph, Some(7.3));
    assert_eq!(replacement.measurements.temp_c(), Some(25.0));
    assert!(w.status().1.starts_with("Correction saved"));
    // The history shows the corrected value, once.
    let t1 = w.app.tank(w.app.tank_index("T-1").unwrap()).clone();
    let today: Vec<_> = w.app.history.readings_of_tank(&t1).into_iter().filter(|e| e.taken_at == now()).collect();
    assert_eq!(today.len(), 1);
    assert!(today[0].corrected);
}

#[test]
fn changing_a_carried_value_asks_whether_the_system_or_the_tank_is_meant() {
    let mut w = Walk::new();
    w.keys("w 25 enter 7.6 enter 0.4 s");
    assert_eq!(w.tank(), "R-2");
    w.keys("up up delete 7.9 s");
    assert!(matches!(w.app.modal, Some(Modal::Pick(_))));
    // "These are the tank's own": a tank reading, no reason needed (nothing saved is corrected).
    w.keys("down enter");
    assert_eq!(w.saved.len(), 2);
    let reading = reading_of(&w.saved[1]);
    assert_eq!(reading.target, Target::Tank("R-2".into()));
    assert_eq!(reading.measurements.ph, Some(7.9));
    assert_eq!(reading.measurements.temp_c(), None, "unchanged carried values stay the system's");
}

#[test]
fn a_failed_save_keeps_the_entry_and_says_not_saved() {
    let mut w = Walk::new();
    w.fail_saves = true;
    w.keys("w 25 enter 7.6 enter 0.4 s");
    assert_eq!(w.tank(), "R-1");
    assert_eq!(w.texts()[..3], ["25".to_string(), "7.6".to_string(), "0.4".to_string()]);
    let (kind, text) = w.status();
    assert_eq!(kind, StatusKind::Error);
    assert!(text.starts_with("NOT saved: disk full"), "{text}");
    w.fail_saves = false;
    w.keys("s");
    assert_eq!(w.saved.len(), 1);
}

#[test]
fn the_verdict_follows_the_typing() {
    let mut w = Walk::new();
    w.keys("w 26 enter 8.2 enter 1.5");
    let verdict = &w.app.walk.as_ref().unwrap().entry.verdict;
    let band = verdict.band.unwrap();
    assert!(band >= Band::Act, "{band:?}");
    w.keys("backspace backspace backspace 0.05");
    let verdict = &w.app.walk.as_ref().unwrap().entry.verdict;
    assert!(verdict.band.unwrap() < band);
    w.keys("delete");
    assert_eq!(w.app.walk.as_ref().unwrap().entry.verdict.missing, ["total ammonia"]);
}

#[test]
fn the_round_ends_on_the_summary() {
    let mut w = Walk::new();
    w.keys("w 25 enter 7.6 enter 0.4 s s s");
    assert_eq!(w.tank(), "T-1");
    w.keys("25 enter 7.4 enter 0.2 s x enter");
    assert!(matches!(w.app.screen(), Screen::Summary(_)));
    assert!(w.status().1.starts_with("Round complete: 4 done, 1 skipped"), "{}", w.status().1);
}

#[test]
fn the_summary_offers_the_round_report() {
    let mut w = Walk::new();
    w.keys("w 25 enter 7.6 enter 0.4 s s s");
    w.keys("25 enter 7.4 enter 0.2 s x enter");
    assert!(matches!(w.app.screen(), Screen::Summary(_)));
    assert_eq!(w.keys("r"), [Effect::Report], "r writes the report of the round");
    assert_eq!(w.status().1, "Writing the round report…");
    update(&mut w.app, &w.keymap, Input::Reported(Ok("/data/reports/round-20261201-0930.html".into())), now());
    assert_eq!(
        w.status(),
        (StatusKind::Success, "Report written to /data/reports/round-20261201-0930.html".to_string())
    );
    update(&mut w.app, &w.keymap, Input::Reported(Err("disk full".into())), now());
    assert_eq!(w.status(), (StatusKind::Error, "Report failed: disk full".to_string()));
}

#[test]
fn notes_and_deaths_go_with_the_reading() {
    let mut w = Walk::new();
    w.keys("w pagedown pagedown pagedown");
    w.keys("d 2 enter n");
    for c in "lid was open".chars() {
        update(&mut w.app, &w.keymap, Input::Key(Key::char(c)), now());
    }
    w.keys("enter s");
    let reading = reading_of(&w.saved[0]);
    assert_eq!(reading.observations.deaths, 2);
    assert_eq!(reading.note.as_deref(), Some("lid was open"));
}

#[test]
fn routine_tank_needs_at_most_five_keys_besides_the_number_characters() {
    let mut w = Walk::new();
    w.keys("w pagedown pagedown pagedown");
    let keys = "25.1 enter 7.4 enter 0.3 enter 0.05 s";
    let non_digit = keys.split(' ').filter(|word| !word.chars().all(|c| c.is_ascii_digit() || c == '.')).count();
    w.keys(keys);
    assert_eq!(w.saved.len(), 1);
    assert!(non_digit <= 5, "{non_digit}");
}

#[test]
fn a_new_round_begins_at_midnight_while_the_screen_is_open() {
    let mut w = Walk::new();
    w.keys("w pagedown pagedown pagedown 25 enter 7.2 enter 0.3 s");
    let t1 = w.app.tank_index("T-1").unwrap();
    assert_eq!(w.app.statuses[t1].due, Due::Done);
    // Time passes past local midnight: this morning's reading no longer counts for the new round.
    let tomorrow = now() + Duration::hours(17);
    update(&mut w.app, &w.keymap, Input::Tick, tomorrow);
    assert_eq!(w.app.round_start, FixedOffset::east_opt(3600).unwrap().with_ymd_and_hms(2026, 12, 2, 0, 0, 0).unwrap());
    assert_eq!(w.app.statuses[t1].due, Due::NotDue);
    update(&mut w.app, &w.keymap, Input::Tick, now() + Duration::hours(24));
    assert_eq!(w.app.statuses[t1].due, Due::Due);
}

#[test]
fn the_fields_come_in_the_rooms_order() {
    // This bench reads pH first (the pen shows temperature beside it), no nitrite, and
    // offers alkalinity and nitrate below.
    let room = ROOM.replace(
        "kit_basis = \"n\"\n",
        "kit_basis = \"n\"\nreading_fields = [\"ph\", \"temperature\", \"total-ammonia\"]\n\
         optional_fields = [\"alkalinity\", \"nitrate\"]\n",
    );
    let mut w = Walk::in_room(&room);
    w.keys("w");
    assert_eq!(w.tank(), "R-1");
    let entry = &w.app.walk.as_ref().unwrap().entry;
    let kinds: Vec<FieldKind> = entry.fields.iter().map(|f| f.kind).collect();
    assert_eq!(
        kinds,
        [
            FieldKind::Ph,
            FieldKind::TemperatureC,
            FieldKind::TotalAmmonia(AmmoniaBasis::N),
            FieldKind::Alkalinity,
            FieldKind::Nitrate
        ]
    );
    assert_eq!(entry.routine, 3);
    // The last reading's values sit beside their own fields.
    assert_eq!(entry.previous.as_ref().unwrap().values[..3], [Some(7.5), Some(25.0), Some(0.2)]);
    // The keep key takes yesterday's pH into the first field.
    w.keys("space");
    assert_eq!(w.texts()[0], "7.5");
    assert_eq!(w.app.walk.as_ref().unwrap().entry.focus, 1);
    // Typed in that order, Enter between, an optional value below, one key to save.
    w.keys("delete shift-tab delete 7.6 enter 25.5 enter 0.4 enter 120 s");
    assert_eq!(w.saved.len(), 1);
    let m = &reading_of(&w.saved[0]).measurements;
    assert_eq!(m.ph, Some(7.6));
    assert_eq!(m.temp_c(), Some(25.5));
    assert_eq!(m.tan_n_mg_l(), Some(0.4));
    assert_eq!(m.alkalinity_mg_l_caco3(), Some(120.0));
    assert_eq!((m.nitrite, m.nitrate), (None, None));
    // The next tank carries the system's values into the same places.
    assert_eq!(w.tank(), "R-2");
    assert_eq!(w.texts(), ["7.6", "25.5", "0.4", "120", ""]);
}

/// A room that reads pH, temperature and total ammonia, nothing else.
fn three_field_room() -> String {
    ROOM.replace(
        "kit_basis = \"n\"\n",
        "kit_basis = \"n\"\nreading_fields = [\"ph\", \"temperature\", \"total-ammonia\"]\noptional_fields = []\n",
    )
}

/// A reading taken an hour ago, this round, with nitrite and chloride besides the three.
fn this_morning_with_nitrite(target: Target, seed: u128) -> Record {
    let mut record = yesterday_reading(target, 7.4, 0.3);
    record.id = Ulid::from_parts(2, seed);
    record.taken_at = now() - Duration::hours(1);
    let RecordBody::Reading(reading) = &mut record.body else { unreachable!() };
    reading.measurements.nitrite = Some(NitrogenReading { value: 0.2, basis: NitrogenIonBasis::N });
    reading.measurements.chloride_mg_l = Some(40.0);
    record
}

#[test]
fn correcting_a_reading_keeps_the_values_the_walk_does_not_show() {
    let mut w = Walk::with_records(&three_field_room(), vec![this_morning_with_nitrite(Target::Tank("T-1".into()), 1)]);
    w.keys("w pagedown pagedown pagedown");
    assert_eq!(w.tank(), "T-1");
    assert_eq!(w.texts(), ["7.4", "25", "0.3"]);
    w.keys("delete 7.1 s enter");
    let RecordBody::Correction(correction) = &w.saved[0].body else { panic!("a correction") };
    let m = &correction.replacement.as_deref().and_then(RecordBody::as_reading).unwrap().measurements;
    assert_eq!(m.ph, Some(7.1));
    assert_eq!(m.nitrite_n_mg_l(), Some(0.2), "nitrite, not shown here, is kept");
    assert_eq!(m.chloride_mg_l, Some(40.0));
}

#[test]
fn correcting_a_systems_reading_keeps_the_values_the_walk_does_not_show() {
    let mut w =
        Walk::with_records(&three_field_room(), vec![this_morning_with_nitrite(Target::System("RACK".into()), 2)]);
    // The rack is done by its system's reading: the walk starts at T-1; back to R-3.
    w.keys("w pageup");
    assert_eq!(w.tank(), "R-3");
    assert!(matches!(w.app.walk.as_ref().unwrap().entry.fields[0].provenance, Provenance::Carried(_)));
    w.keys("delete 7.0 s");
    assert!(matches!(w.app.modal, Some(Modal::Pick(_))));
    // Correct the system's reading, for the reason suggested.
    w.keys("enter enter");
    let RecordBody::Correction(correction) = &w.saved[0].body else { panic!("a correction") };
    let replacement = correction.replacement.as_deref().and_then(RecordBody::as_reading).unwrap();
    assert_eq!(replacement.target, Target::System("RACK".into()));
    assert_eq!(replacement.measurements.ph, Some(7.0));
    assert_eq!(replacement.measurements.nitrite_n_mg_l(), Some(0.2));
    assert_eq!(replacement.measurements.chloride_mg_l, Some(40.0));
}

#[test]
fn the_board_syncs_and_shows_what_came_in() {
    let mut w = Walk::new();
    assert_eq!(w.keys("u"), [Effect::Sync], "u syncs from the board");
    assert_eq!(w.status(), (StatusKind::Info, "Syncing with the shared folder…".to_string()));
    // Another laptop read T-2 this morning: once synced, the board counts it as done.
    let t2 = w.app.facility.tanks.iter().position(|t| t.id.as_str() == "T-2").unwrap();
    assert!(w.app.statuses[t2].due.wanted());
    let mut reading = Reading::new(Target::Tank("T-2".into()));
    reading.measurements.temperature = Some(Temperature::celsius(25.0));
    reading.measurements.ph = Some(7.5);
    reading.measurements.total_ammonia = Some(TotalAmmonia { value: 0.2, basis: AmmoniaBasis::N });
    let other = Record {
        id: Ulid::from_parts(2, 99),
        device: DeviceId(Ulid::from_parts(3, 3)),
        operator: "Bram Esterhuys".into(),
        taken_at: now() - Duration::minutes(30),
        body: RecordBody::Reading(reading),
    };
    let mut everything: Vec<Record> = vec![
        yesterday_reading(Target::System("RACK".into()), 7.5, 0.2),
        yesterday_reading(Target::Tank("T-1".into()), 7.4, 0.3),
    ];
    everything.push(other);
    update(&mut w.app, &w.keymap, Input::Synced(Ok(("sent 0, received 1 new".into(), everything))), now());
    assert_eq!(w.status(), (StatusKind::Success, "Synced: sent 0, received 1 new".to_string()));
    assert!(!w.app.statuses[t2].due.wanted(), "T-2 is done by the other laptop's reading");
    update(&mut w.app, &w.keymap, Input::Synced(Err("no shared folder yet".into())), now());
    assert_eq!(w.status(), (StatusKind::Error, "Sync failed: no shared folder yet".to_string()));
}
