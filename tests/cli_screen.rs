//! The screen's commands when there is no terminal (a pipe, a CI job): a clear
//! message and exit code 1, never a panic, and nothing written.

use std::process::{Command, Stdio};

fn tankwalk(args: &[&str], data: &std::path::Path) -> std::process::Output {
    Command::new(env!("CARGO_BIN_EXE_tankwalk"))
        .args(args)
        .env("TANKWALK_DATA", data)
        .env_remove("TANKWALK_ROOM")
        .env_remove("TANKWALK_KEYMAP")
        .stdin(Stdio::null())
        .output()
        .unwrap()
}

#[test]
fn without_a_terminal_the_screen_says_so_and_stops() {
    let data = tempfile::tempdir().unwrap();
    for args in [&["--room", "sample-rooms/harbourside-holding.toml"][..], &["demo"]] {
        let out = tankwalk(args, data.path());
        let stderr = String::from_utf8_lossy(&out.stderr);
        assert_eq!(out.status.code(), Some(1), "{args:?}: {stderr}");
        assert!(stderr.contains("the screen needs a terminal, but standard input is not one"), "{stderr}");
        assert!(!stderr.contains("panicked"), "{stderr}");
    }
    assert!(std::fs::read_dir(data.path()).unwrap().next().is_none(), "nothing is written without a screen");
}

#[test]
fn help_says_that_no_command_opens_the_screen() {
    let data = tempfile::tempdir().unwrap();
    let out = tankwalk(&["--help"], data.path());
    assert!(String::from_utf8_lossy(&out.stdout).contains("Without a command, tankwalk opens the walk screen"));
}
