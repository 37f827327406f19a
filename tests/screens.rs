//! Render snapshots of every screen at 80x24 and 160x48, colour off, on a
//! sample room with a generated history, driven by keys through the keymap.

use chrono::{DateTime, FixedOffset, TimeZone};
use ratatui::Terminal;
use ratatui::backend::TestBackend;
use tankwalk::model::facility::Facility;
use tankwalk::model::record::DeviceId;
use tankwalk::tui::keymap::{Key, Keymap};
use tankwalk::tui::state::{App, Input, SessionInfo, update};
use tankwalk::tui::view;
use ulid::Ulid;

fn now() -> DateTime<FixedOffset> {
    FixedOffset::east_opt(3600).unwrap().with_ymd_and_hms(2026, 12, 1, 7, 40, 0).unwrap()
}

fn app() -> App {
    let facility = Facility::load(std::path::Path::new("sample-rooms/harbourside-holding.toml")).unwrap();
    let device = DeviceId(Ulid::from_parts(1, 1));
    let records = tankwalk::demo::history(&facility, device, now(), 60, 11);
    let mut app =
        App::new(facility, records, SessionInfo { operator: "Ines Okafor".into(), device, id_seed: 42 }, now());
    app.colour = false;
    app
}

fn press(app: &mut App, keymap: &Keymap, keys: &[&str]) {
    for k in keys {
        let key: Key = k.parse().unwrap();
        let effects = update(app, keymap, Input::Key(key), now());
        // Saves succeed at once, as the store would answer.
        for effect in effects {
            if let tankwalk::tui::state::Effect::Save(records) = effect {
                update(app, keymap, Input::Saved(Ok(records)), now());
            }
        }
    }
}

fn draw(app: &App, keymap: &Keymap, width: u16, height: u16) -> TestBackend {
    let mut terminal = Terminal::new(TestBackend::new(width, height)).unwrap();
    terminal.draw(|frame| view::render(app, keymap, frame)).unwrap();
    terminal.backend().clone()
}

fn both_sizes(name: &str, app: &App, keymap: &Keymap) {
    insta::assert_snapshot!(format!("{name}_80x24"), draw(app, keymap, 80, 24));
    insta::assert_snapshot!(format!("{name}_160x48"), draw(app, keymap, 160, 48));
}

#[test]
fn board() {
    let keymap = Keymap::default_map();
    let app = app();
    both_sizes("board", &app, &keymap);
}

#[test]
fn walk_typing_a_reading() {
    let keymap = Keymap::default_map();
    let mut app = app();
    press(&mut app, &keymap, &["w", "2", "5", ".", "5", "enter", "7", ".", "6", "enter", "0", ".", "4"]);
    both_sizes("walk_typing", &app, &keymap);
}

#[test]
fn tank_page() {
    let keymap = Keymap::default_map();
    let mut app = app();
    press(&mut app, &keymap, &["down", "down", "enter"]);
    both_sizes("tank_page", &app, &keymap);
}

#[test]
fn whatif_panel() {
    let keymap = Keymap::default_map();
    let mut app = app();
    press(&mut app, &keymap, &["i", "right", "right", "right"]);
    both_sizes("whatif", &app, &keymap);
}

#[test]
fn summary() {
    let keymap = Keymap::default_map();
    let mut app = app();
    press(&mut app, &keymap, &["s"]);
    both_sizes("summary", &app, &keymap);
}
