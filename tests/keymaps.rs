//! The shipped keymaps load; every kind of mistake in a keymap is reported with
//! its own message and line; key names and action names round-trip; and help
//! follows the keys actually bound.

use std::path::{Path, PathBuf};
use std::process::Command;

use proptest::prelude::*;
use ratatui::Terminal;
use ratatui::backend::TestBackend;
use tankwalk::tui::action::Action;
use tankwalk::tui::help::{HelpOverlay, help_rows, keys_markdown};
use tankwalk::tui::keymap::{Context, DEFAULT_KEYMAP, Key, KeyChord, KeyCode, Keymap};

fn files_in(dir: &str) -> Vec<PathBuf> {
    let mut files: Vec<PathBuf> = std::fs::read_dir(dir)
        .unwrap()
        .map(|entry| entry.unwrap().path())
        .filter(|path| path.extension().is_some_and(|e| e == "toml"))
        .collect();
    files.sort();
    files
}

fn origin(path: &Path) -> String {
    path.to_string_lossy().replace('\\', "/")
}

#[test]
fn every_shipped_keymap_loads_alone_and_over_the_default() {
    let files = files_in("keymaps");
    assert!(files.len() >= 2, "default and vim at least: {files:?}");
    for path in files {
        let text = std::fs::read_to_string(&path).unwrap();
        Keymap::from_toml(&text, &origin(&path)).unwrap_or_else(|e| panic!("{e}"));
        Keymap::default_with_overrides(&text, &origin(&path)).unwrap_or_else(|e| panic!("{e}"));
    }
    assert_eq!(std::fs::read_to_string("keymaps/default.toml").unwrap(), DEFAULT_KEYMAP);
}

#[test]
fn the_default_keymap_binds_every_action_somewhere() {
    let keymap = Keymap::default_map();
    for action in Action::ALL {
        let bound = Context::ALL.iter().any(|c| !keymap.chords_for(*c, *action).is_empty());
        assert!(bound, "'{action}' has no key in the default keymap");
    }
}

#[test]
fn every_screen_can_show_help_and_go_back() {
    for path in files_in("keymaps") {
        let text = std::fs::read_to_string(&path).unwrap();
        let keymap = Keymap::default_with_overrides(&text, &origin(&path)).unwrap();
        for context in Context::ALL.iter().filter(|c| c.inherits_global()) {
            for action in [Action::ToggleHelp, Action::Back, Action::Quit] {
                assert!(!keymap.chords_for(*context, action).is_empty(), "{path:?} [{context}] {action}");
            }
        }
        for context in [Context::Pick, Context::Prompt, Context::Confirm] {
            for action in [Action::Confirm, Action::Cancel] {
                assert!(!keymap.chords_for(context, action).is_empty(), "{path:?} [{context}] {action}");
            }
        }
    }
}

/// The first line of each invalid fixture says `# expect: LINE: REASON`.
fn expectation(text: &str) -> (usize, String) {
    let first = text.lines().next().unwrap();
    let rest = first.strip_prefix("# expect: ").expect("first line is '# expect: LINE: REASON'");
    let (line, reason) = rest.split_once(": ").unwrap();
    (line.parse().unwrap(), reason.to_string())
}

#[test]
fn each_invalid_keymap_fails_with_its_own_message_and_line() {
    let files = files_in("tests/fixtures/keymaps-invalid");
    assert!(files.len() >= 10);
    let mut messages = std::collections::HashSet::new();
    for path in files {
        let text = std::fs::read_to_string(&path).unwrap();
        let (line, reason) = expectation(&text);
        let errors = Keymap::default_with_overrides(&text, &origin(&path)).expect_err(&origin(&path)).0;
        assert_eq!(errors.len(), 1, "{path:?}: one mistake per file, got {errors:?}");
        let error = &errors[0];
        assert_eq!((error.line, error.reason.as_str()), (line, reason.as_str()), "{path:?}");
        assert_eq!(error.to_string(), format!("{}:{line}: {reason}", origin(&path)));
        assert!(messages.insert(reason), "{path:?} repeats another fixture's message");
    }
}

fn tankwalk(args: &[&str]) -> std::process::Output {
    let data = tempfile::tempdir().unwrap();
    Command::new(env!("CARGO_BIN_EXE_tankwalk"))
        .args(args)
        .env_remove("TANKWALK_KEYMAP")
        .env("TANKWALK_DATA", data.path())
        .output()
        .unwrap()
}

#[test]
fn keymap_check_reports_each_mistake_and_exits_1() {
    for path in files_in("tests/fixtures/keymaps-invalid") {
        let text = std::fs::read_to_string(&path).unwrap();
        let (line, reason) = expectation(&text);
        let out = tankwalk(&["keymap", "check", &origin(&path)]);
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(1), "{path:?}: {stderr}");
        assert!(stderr.contains(&format!("{}:{line}: {reason}", origin(&path))), "{path:?}: {stderr}");
    }
    let out = tankwalk(&["keymap", "check", "keymaps/vim.toml"]);
    assert_eq!(out.status.code(), Some(0), "{}", String::from_utf8_lossy(&out.stderr));
    assert!(String::from_utf8_lossy(&out.stdout).starts_with("keymaps/vim.toml: fine"));
}

#[test]
fn a_bad_keymap_in_use_stops_with_exit_2_and_is_never_skipped() {
    let out = tankwalk(&["--keymap", "tests/fixtures/keymaps-invalid/typed-key.toml", "keymap", "show"]);
    assert_eq!(out.status.code(), Some(2));
    let stderr = String::from_utf8_lossy(&out.stderr);
    assert!(stderr.contains("typed-key.toml:5: in [walk], '0' types into the field"), "{stderr}");

    let out = tankwalk(&["--keymap", "no/such/keymap.toml", "keymap", "show"]);
    assert_eq!(out.status.code(), Some(2));
    assert!(String::from_utf8_lossy(&out.stderr).contains("cannot read the keymap 'no/such/keymap.toml'"));
}

#[test]
fn the_data_folder_keymap_is_used_and_shown() {
    let data = tempfile::tempdir().unwrap();
    std::fs::write(data.path().join("keymap.toml"), "[board]\n\"ctrl-n\" = \"select-next\"\n").unwrap();
    let out = Command::new(env!("CARGO_BIN_EXE_tankwalk"))
        .args(["keymap", "show", "--context", "board", "--json"])
        .env_remove("TANKWALK_KEYMAP")
        .env("TANKWALK_DATA", data.path())
        .output()
        .unwrap();
    assert_eq!(out.status.code(), Some(0), "{}", String::from_utf8_lossy(&out.stderr));
    let rows: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let next = rows.as_array().unwrap().iter().find(|r| r["action"] == "select-next").unwrap();
    assert_eq!(next["keys"], serde_json::json!(["down", "ctrl-n"]));
    assert_eq!(next["context"], "board");
}

#[test]
fn action_names_round_trip_through_keymap_files() {
    for action in Action::ALL {
        let context = Context::ALL.iter().copied().find(|c| c.allows(*action)).unwrap();
        let text = format!("[{}]\n\"f12\" = \"{}\"\n", context.name(), action.name());
        let keymap = Keymap::from_toml(&text, "round-trip.toml").unwrap();
        assert_eq!(keymap.chords_for(context, *action).len(), 1, "{action}");
    }
}

fn key_strategy() -> impl Strategy<Value = Key> {
    let named = prop_oneof![
        Just(KeyCode::Enter),
        Just(KeyCode::Esc),
        Just(KeyCode::Tab),
        Just(KeyCode::Backspace),
        Just(KeyCode::Delete),
        Just(KeyCode::Insert),
        Just(KeyCode::Up),
        Just(KeyCode::Down),
        Just(KeyCode::Left),
        Just(KeyCode::Right),
        Just(KeyCode::Home),
        Just(KeyCode::End),
        Just(KeyCode::PageUp),
        Just(KeyCode::PageDown),
        (1u8..=24).prop_map(KeyCode::F),
    ];
    let printable = any::<char>().prop_filter("printable", |c| !c.is_whitespace() && !c.is_control());
    let code = prop_oneof![3 => printable.prop_map(KeyCode::Char), 1 => Just(KeyCode::Char(' ')), 2 => named];
    (code, any::<bool>(), any::<bool>(), any::<bool>())
        .prop_map(|(code, ctrl, alt, shift)| Key::new(code, ctrl, alt, shift))
}

proptest! {
    #[test]
    fn chords_print_and_parse_back(keys in prop::collection::vec(key_strategy(), 1..4)) {
        let text = keys.iter().map(ToString::to_string).collect::<Vec<_>>().join(" ");
        let chord: KeyChord = text.parse().map_err(|e| TestCaseError::fail(format!("{text:?}: {e}")))?;
        prop_assert_eq!(chord.keys(), keys.as_slice());
        prop_assert_eq!(chord.to_string(), text);
    }

    #[test]
    fn any_text_as_a_keymap_gives_a_keymap_or_located_errors(text in "\\PC{0,200}") {
        if let Err(errors) = Keymap::default_with_overrides(&text, "fuzz.toml") {
            prop_assert!(!errors.0.is_empty());
            for error in errors.0 {
                prop_assert!(error.line >= 1 && error.line <= text.lines().count().max(1) + 1, "{}", error);
            }
        }
    }
}

fn render_help(keymap: &Keymap, context: Context, width: u16, height: u16) -> TestBackend {
    let mut terminal = Terminal::new(TestBackend::new(width, height)).unwrap();
    terminal
        .draw(|frame| {
            let overlay = HelpOverlay { keymap, context, scroll: 0 };
            frame.render_widget(&overlay, frame.area());
        })
        .unwrap();
    terminal.backend().clone()
}

fn vim() -> Keymap {
    Keymap::default_with_overrides(&std::fs::read_to_string("keymaps/vim.toml").unwrap(), "keymaps/vim.toml").unwrap()
}

#[test]
fn help_follows_the_keys_bound() {
    let default = Keymap::default_map();
    let vim = vim();
    let keys_of = |keymap: &Keymap, action: Action| {
        help_rows(keymap, Context::Board).into_iter().find(|r| r.action == action).map(|r| r.keys())
    };
    assert_eq!(keys_of(&default, Action::SelectNext).as_deref(), Some("down"));
    assert_eq!(keys_of(&vim, Action::SelectNext).as_deref(), Some("down, j"));
    assert_eq!(keys_of(&vim, Action::SelectFirst).as_deref(), Some("home, g g"));
    // Rows where the maps agree are the same.
    assert_eq!(keys_of(&default, Action::StartWalk), keys_of(&vim, Action::StartWalk));
    insta::assert_snapshot!("help_board_default_80x24", render_help(&default, Context::Board, 80, 24));
    insta::assert_snapshot!("help_board_vim_80x24", render_help(&vim, Context::Board, 80, 24));
    insta::assert_snapshot!("help_walk_default_80x24", render_help(&default, Context::Walk, 80, 24));
    insta::assert_snapshot!("help_walk_vim_160x48", render_help(&vim, Context::Walk, 160, 48));
}

#[test]
fn docs_keys_md_is_the_default_keymap() {
    let generated = keys_markdown(&Keymap::default_map());
    if std::env::var_os("TANKWALK_WRITE_DOCS").is_some() {
        std::fs::write("docs/keys.md", &generated).unwrap();
    }
    let written = std::fs::read_to_string("docs/keys.md").unwrap_or_default();
    assert!(
        written == generated,
        "docs/keys.md is out of date with keymaps/default.toml: run `TANKWALK_WRITE_DOCS=1 cargo test --test keymaps`"
    );
}
