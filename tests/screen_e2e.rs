//! End to end in a real terminal: the real binary in tmux on a sample room
//! with a temporary data folder walks six tubs (five read, one skipped) and
//! writes the round report from the summary and quits; `tankwalk log --json`
//! must then hold exactly those five readings and the skip with its reason.
//!
//! A second test makes the screen panic (by fault injection) in the middle of
//! the walk and checks that the terminal is left usable and no save is lost.
//!
//! tmux must be installed (`.ci/run` installs it).

use std::path::Path;
use std::process::Command;
use std::time::{Duration, Instant};

const BIN: &str = env!("CARGO_BIN_EXE_tankwalk");

struct Tmux {
    socket: String,
}

impl Tmux {
    fn run(&self, args: &[&str]) -> String {
        let out = Command::new("tmux")
            .arg("-L")
            .arg(&self.socket)
            .args(args)
            .output()
            .expect("tmux runs (install it: apt-get install tmux)");
        assert!(out.status.success(), "tmux {args:?}: {}", String::from_utf8_lossy(&out.stderr));
        String::from_utf8_lossy(&out.stdout).into_owned()
    }

    fn screen(&self) -> String {
        self.run(&["capture-pane", "-p", "-t", "e2e"])
    }

    /// The pane and its history, wrapped lines joined.
    fn screen_and_history(&self) -> String {
        self.run(&["capture-pane", "-p", "-J", "-S", "-", "-t", "e2e"])
    }

    /// A tmux format of the pane (`#{alternate_on}`, `#{cursor_flag}`, ...).
    fn pane(&self, format: &str) -> String {
        self.run(&["display-message", "-p", "-t", "e2e", format]).trim().to_string()
    }

    /// Waits until the screen shows `text`; on timeout fails with the screen.
    fn wait_for(&self, text: &str) {
        let deadline = Instant::now() + Duration::from_secs(20);
        loop {
            let screen = self.screen();
            if screen.contains(text) {
                return;
            }
            assert!(Instant::now() < deadline, "waited for {text:?}; the screen shows:\n{screen}");
            std::thread::sleep(Duration::from_millis(50));
        }
    }

    fn keys(&self, keys: &[&str]) {
        for key in keys {
            if key.chars().all(|c| c.is_ascii_digit() || c == '.') {
                self.run(&["send-keys", "-t", "e2e", "-l", key]);
            } else {
                self.run(&["send-keys", "-t", "e2e", key]);
            }
        }
    }
}

impl Drop for Tmux {
    fn drop(&mut self) {
        let _ = Command::new("tmux").args(["-L", &self.socket, "kill-server"]).output();
    }
}

fn shell_quote(s: &str) -> String {
    format!("'{}'", s.replace('\'', r"'\''"))
}

#[test]
fn walk_five_tubs_skip_one_quit_and_the_log_has_exactly_those_readings() {
    let data = tempfile::tempdir().unwrap();
    let room = Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-rooms/cattail-bend-tubs.toml");
    let tmux = Tmux { socket: format!("tankwalk-e2e-{}", std::process::id()) };
    let command = format!(
        "env -u TANKWALK_KEYMAP -u TANKWALK_ROOM NO_COLOR=1 TANKWALK_OPERATOR=e2e-tester {} --room {} --data-dir {}; \
         echo \"tankwalk exited $?\"; sleep 60",
        shell_quote(BIN),
        shell_quote(&room.to_string_lossy()),
        shell_quote(&data.path().to_string_lossy())
    );
    tmux.run(&["-f", "/dev/null", "new-session", "-d", "-s", "e2e", "-x", "100", "-y", "30", &command]);
    tmux.run(&["set-option", "-g", "escape-time", "0"]);
    tmux.wait_for("Room board");
    tmux.keys(&["w"]);
    tmux.wait_for("T-01");
    // Tubs 1, 2, 4, 5 and 6 are read in the room's order (pH, °F, total ammonia as NH4+,
    // nitrite); tub 3 is skipped.
    let readings = [("T-01", "78", "7.2", "0.3"), ("T-02", "77", "7.4", "0.5"), ("T-04", "79", "7.0", "0.25")];
    let more = [("T-05", "78.5", "7.6", "1.2"), ("T-06", "76", "7.3", "0.1")];
    for (tank, temp, ph, tan) in readings.iter().chain(&more) {
        if *tank == "T-04" {
            tmux.wait_for("T-03");
            tmux.keys(&["x"]);
            tmux.wait_for("Why is T-03 skipped?");
            tmux.keys(&["Enter"]);
            tmux.wait_for("Skipped T-03");
        }
        tmux.wait_for(&format!(" {tank} "));
        tmux.keys(&[ph, "Enter", temp, "Enter", tan, "Enter", "0.05", "s"]);
        tmux.wait_for(&format!("Saved: {tank} is on disk"));
    }
    // The summary writes the round report into the data folder.
    tmux.keys(&["r"]);
    tmux.wait_for("Round summary");
    tmux.keys(&["r"]);
    tmux.wait_for("Report written to");
    let reports: Vec<_> = std::fs::read_dir(data.path().join("reports")).unwrap().map(|e| e.unwrap().path()).collect();
    assert_eq!(reports.len(), 1, "{reports:?}");
    let page = std::fs::read_to_string(&reports[0]).unwrap();
    assert!(page.starts_with("<!DOCTYPE html>") && page.contains("Cattail Bend tub room"), "{}", reports[0].display());
    assert!(page.contains("being set up"), "the skip and its reason are in the report");
    tmux.keys(&["q"]);
    tmux.wait_for("tankwalk exited 0");

    let out = Command::new(BIN)
        .args(["log", "--json", "--data-dir"])
        .arg(data.path())
        .env_remove("TANKWALK_ROOM")
        .output()
        .unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let log: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let all = log.as_array().unwrap();
    // The skip is stored too, with its reason.
    let skips: Vec<_> = all.iter().filter(|r| r["kind"] == "skip").collect();
    assert_eq!(skips.len(), 1, "{log:#}");
    assert_eq!(skips[0]["tank"], "T-03");
    assert_eq!(skips[0]["note"], "tank empty or being set up", "{:#}", skips[0]);
    let rows: Vec<_> = all.iter().filter(|r| r["kind"] != "skip").collect();
    assert_eq!(rows.len(), 5, "{log:#}");
    let mut tanks: Vec<&str> = rows.iter().map(|r| r["tank"].as_str().unwrap()).collect();
    tanks.sort_unstable();
    assert_eq!(tanks, ["T-01", "T-02", "T-04", "T-05", "T-06"]);
    for (tank, temp_f, ph, _) in readings.iter().chain(&more) {
        let row = rows.iter().find(|r| r["tank"] == *tank).unwrap();
        assert_eq!(row["kind"], "reading");
        assert_eq!(row["ph"].as_f64().unwrap(), ph.parse::<f64>().unwrap(), "{tank}");
        let celsius = (temp_f.parse::<f64>().unwrap() - 32.0) / 1.8;
        assert!((row["temp_c"].as_f64().unwrap() - celsius).abs() < 1e-9, "{tank}");
        assert!(row["tan_n_mg_l"].as_f64().is_some(), "{tank}");
        assert!(row["supersedes"].is_null(), "{tank}");
    }
}

#[test]
fn a_panic_inside_the_screen_leaves_the_terminal_usable_and_keeps_earlier_saves() {
    let data = tempfile::tempdir().unwrap();
    let room = Path::new(env!("CARGO_MANIFEST_DIR")).join("sample-rooms/cattail-bend-tubs.toml");
    let stty = data.path().join("stty-after.txt");
    let tmux = Tmux { socket: format!("tankwalk-panic-{}", std::process::id()) };
    // The shell runs tankwalk, then records the terminal's modes, then waits for typing.
    let command = format!(
        "env -u TANKWALK_KEYMAP -u TANKWALK_ROOM -u RUST_BACKTRACE NO_COLOR=1 TANKWALK_OPERATOR=e2e-tester \
         TANKWALK_TEST_PANIC_ON_SAVE=2 {} --room {} --data-dir {}; \
         echo \"tankwalk exited $?\"; stty -a > {}; exec sh",
        shell_quote(BIN),
        shell_quote(&room.to_string_lossy()),
        shell_quote(&data.path().to_string_lossy()),
        shell_quote(&stty.to_string_lossy()),
    );
    tmux.run(&["-f", "/dev/null", "new-session", "-d", "-s", "e2e", "-x", "100", "-y", "30", &command]);
    tmux.run(&["set-option", "-g", "escape-time", "0"]);
    tmux.wait_for("Room board");
    assert_eq!(tmux.pane("#{alternate_on}"), "1", "the screen runs on the alternate screen");
    tmux.keys(&["w"]);
    tmux.wait_for(" T-01 ");
    // The tub room reads pH first, then °F, total ammonia, nitrite.
    tmux.keys(&["7.2", "Enter", "78", "Enter", "0.3", "Enter", "0.05", "s"]);
    tmux.wait_for("Saved: T-01 is on disk");
    // The second save panics inside the screen.
    tmux.wait_for(" T-02 ");
    tmux.keys(&["7.4", "Enter", "77", "Enter", "0.5", "Enter", "0.1", "s"]);
    tmux.wait_for("tankwalk exited 101");

    let screen = tmux.screen_and_history();
    assert!(screen.contains("fault injected"), "the panic message is shown:\n{screen}");
    // Nothing wrote over the message: it is still there, above the shell's line.
    let at = |text: &str| screen.find(text).unwrap_or_else(|| panic!("{text:?} is not on screen:\n{screen}"));
    assert!(at("panicked at") < at("tankwalk exited 101"), "{screen}");
    assert!(screen.contains("Every record that tankwalk said was saved is on disk"), "{screen}");
    assert_eq!(tmux.pane("#{alternate_on}"), "0", "back on the main screen:\n{screen}");
    assert_eq!(tmux.pane("#{cursor_flag}"), "1", "the cursor is visible again");
    // Cooked mode again: line editing and echo on (raw mode turns both off).
    let deadline = Instant::now() + Duration::from_secs(10);
    while !stty.exists() && Instant::now() < deadline {
        std::thread::sleep(Duration::from_millis(50));
    }
    let modes = std::fs::read_to_string(&stty).unwrap();
    let words: Vec<&str> = modes.split_whitespace().collect();
    for mode in ["icanon", "echo", "isig", "icrnl", "opost"] {
        assert!(words.contains(&mode), "'{mode}' is off after the panic:\n{modes}");
    }
    // And a person can type a command at the shell and see it answered.
    tmux.run(&["send-keys", "-t", "e2e", "-l", "echo usable-$((6*7))"]);
    tmux.keys(&["Enter"]);
    tmux.wait_for("usable-42");

    // The save before the panic is on disk; the one that panicked is not.
    let out = Command::new(BIN)
        .args(["log", "--json", "--data-dir"])
        .arg(data.path())
        .env_remove("TANKWALK_ROOM")
        .output()
        .unwrap();
    assert!(out.status.success(), "{}", String::from_utf8_lossy(&out.stderr));
    let log: serde_json::Value = serde_json::from_slice(&out.stdout).unwrap();
    let tanks: Vec<&str> = log.as_array().unwrap().iter().map(|r| r["tank"].as_str().unwrap()).collect();
    assert_eq!(tanks, ["T-01"], "{log:#}");
}
