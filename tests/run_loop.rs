//! The loop on a test backend with scripted terminal events: key releases are
//! ignored, a resize redraws, saves go to the records' store before the
//! screen says saved, and quitting ends the loop.

use std::collections::VecDeque;
use std::io;
use std::time::Duration;

use chrono::{DateTime, FixedOffset, TimeZone};
use ratatui::Terminal;
use ratatui::backend::TestBackend;
use ratatui::crossterm::event::{Event, KeyCode, KeyEvent, KeyEventKind, KeyEventState, KeyModifiers};
use tankwalk::model::facility::Facility;
use tankwalk::model::record::{DeviceId, Record};
use tankwalk::tui::keymap::Keymap;
use tankwalk::tui::run::{Events, Records, run_loop};
use tankwalk::tui::state::{App, SessionInfo};
use ulid::Ulid;

fn now() -> DateTime<FixedOffset> {
    FixedOffset::east_opt(3600).unwrap().with_ymd_and_hms(2026, 12, 1, 7, 40, 0).unwrap()
}

struct Script(VecDeque<Event>);

impl Events for Script {
    fn next(&mut self, _timeout: Duration) -> io::Result<Option<Event>> {
        match self.0.pop_front() {
            Some(event) => Ok(Some(event)),
            None => Err(io::Error::other("the script ran out before the screen quit")),
        }
    }
}

#[derive(Default)]
struct Saved {
    records: Vec<Record>,
    exports: usize,
}

impl Records for Saved {
    fn save(&mut self, records: &[Record]) -> Result<(), String> {
        self.records.extend_from_slice(records);
        Ok(())
    }
    fn export(&mut self) -> Result<String, String> {
        self.exports += 1;
        Ok("/tmp/exports".into())
    }
}

fn key(code: KeyCode, kind: KeyEventKind) -> Event {
    Event::Key(KeyEvent { code, modifiers: KeyModifiers::NONE, kind, state: KeyEventState::NONE })
}

fn typed(text: &str) -> Vec<Event> {
    text.chars().map(|c| key(KeyCode::Char(c), KeyEventKind::Press)).collect()
}

#[test]
fn a_scripted_walk_saves_once_per_press_and_quits() {
    let facility = Facility::load(std::path::Path::new("sample-rooms/cattail-bend-tubs.toml")).unwrap();
    let device = DeviceId(Ulid::from_parts(1, 1));
    let mut app = App::new(facility, Vec::new(), SessionInfo { operator: "Ines".into(), device, id_seed: 3 }, now());
    let keymap = Keymap::default_map();
    let mut events = vec![key(KeyCode::Char('w'), KeyEventKind::Press), key(KeyCode::Char('w'), KeyEventKind::Release)];
    events.push(Event::Resize(100, 30));
    // The tub room reads pH first, then °F.
    events.extend(typed("7.2"));
    events.push(key(KeyCode::Enter, KeyEventKind::Press));
    // A release of Enter must not move to a second field.
    events.push(key(KeyCode::Enter, KeyEventKind::Release));
    events.extend(typed("78"));
    events.push(key(KeyCode::Enter, KeyEventKind::Press));
    events.extend(typed("0.3"));
    events.push(key(KeyCode::Char('s'), KeyEventKind::Press));
    events.push(key(KeyCode::Char('s'), KeyEventKind::Release));
    events.push(key(KeyCode::Char('q'), KeyEventKind::Press));
    let mut terminal = Terminal::new(TestBackend::new(100, 30)).unwrap();
    let mut saved = Saved::default();
    let result = run_loop(&mut terminal, &mut Script(events.into()), &mut app, &keymap, &mut saved, &|| now());
    assert!(result.is_ok(), "{result:?}\n{}", terminal.backend());
    assert_eq!(saved.records.len(), 1);
    let reading = saved.records[0].body.as_reading().unwrap();
    assert!((reading.measurements.temp_c().unwrap() - 25.56).abs() < 0.01);
    assert_eq!(reading.measurements.ph, Some(7.2));
    // As the room's kit reads it (as NH4+).
    assert_eq!(reading.measurements.total_ammonia.map(|a| (a.value, a.basis.name())), Some((0.3, "nh4")));
    let screen = terminal.backend().to_string();
    assert!(screen.contains("Saved: "), "{screen}");
    assert_eq!(saved.exports, 0);
}
