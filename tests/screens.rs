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
    app_in("sample-rooms/harbourside-holding.toml")
}

fn app_in(room: &str) -> App {
    let facility = Facility::load(std::path::Path::new(room)).unwrap();
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
fn walk_in_the_rooms_order() {
    // The tub room reads pH first, and offers alkalinity among its optional fields.
    let keymap = Keymap::default_map();
    let mut app = app_in("sample-rooms/cattail-bend-tubs.toml");
    press(&mut app, &keymap, &["w", "7", ".", "4", "enter", "7", "8"]);
    both_sizes("walk_rooms_order", &app, &keymap);
    let text = draw(&app, &keymap, 80, 24).to_string();
    let at = |label: &str| text.find(label).unwrap_or_else(|| panic!("{label} not on\n{text}"));
    assert!(at("pH ") < at("Temperature") && at("Nitrite") < at("optional") && at("optional") < at("Alkalinity"));
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

#[test]
fn help_over_the_walk_lists_its_live_keys() {
    let keymap = Keymap::default_map();
    let mut app = app();
    press(&mut app, &keymap, &["w", "?"]);
    both_sizes("walk_help", &app, &keymap);
    let vim =
        Keymap::default_with_overrides(&std::fs::read_to_string("keymaps/vim.toml").unwrap(), "vim.toml").unwrap();
    let text = draw(&app, &vim, 80, 24).to_string();
    assert!(text.contains("enter, tab, down, j"), "{text}");
}

#[test]
fn tank_page_with_a_prompt_of_the_event_form() {
    let keymap = Keymap::default_map();
    let mut app = app();
    press(&mut app, &keymap, &["enter", "a", "enter"]);
    both_sizes("event_prompt", &app, &keymap);
}

#[test]
fn below_the_minimum_size_one_line_says_what_is_needed() {
    let keymap = Keymap::default_map();
    let app = app();
    let text = draw(&app, &keymap, 79, 24).to_string();
    assert!(text.contains("tankwalk needs a terminal of at least 80×24; this one is 79×24"), "{text}");
    // Nothing panics on tiny or empty terminals, on any screen.
    let mut app = app;
    for keys in [&[][..], &["w"], &["esc", "enter"], &["esc", "s"], &["esc", "i"]] {
        press(&mut app, &keymap, keys);
        for w in 0..=6 {
            for h in 0..=6 {
                draw(&app, &keymap, w, h);
            }
        }
    }
}

#[test]
fn without_colour_the_selection_and_bands_still_show() {
    let keymap = Keymap::default_map();
    let mut app = app();
    app.colour = false;
    let buffer = draw(&app, &keymap, 80, 24).buffer().clone();
    assert!(buffer.content().iter().all(|cell| cell.fg == ratatui::style::Color::Reset));
    // The selected line is marked by a symbol, not colour alone.
    let line4: String = (0..80).map(|x| buffer[(x, 4)].symbol().to_string()).collect();
    assert!(line4.starts_with("▶ "), "{line4}");
    app.colour = true;
    let buffer = draw(&app, &keymap, 80, 24).buffer().clone();
    assert!(buffer.content().iter().any(|cell| cell.fg != ratatui::style::Color::Reset));
    assert!(buffer[(0, 4)].modifier.contains(ratatui::style::Modifier::REVERSED));
}
