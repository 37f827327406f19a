//! Entering and leaving the terminal safely.
//!
//! The screen starts only when standard input and output are both terminals
//! (otherwise a clear message, not a panic); [`ratatui::try_init`] switches to
//! raw mode and the alternate screen and installs a panic hook that restores
//! the terminal. [`Session`] restores it when dropped (except while a panic
//! unwinds: the hook did it), so every way out (a normal quit, an error,
//! Ctrl-C handled as a key in raw mode, a panic) leaves the terminal usable.

use std::io::{self, IsTerminal};
use std::ops::{Deref, DerefMut};

use ratatui::DefaultTerminal;

/// Why the screen could not start.
#[derive(Debug, thiserror::Error)]
pub enum TerminalError {
    /// Standard input or output is not a terminal (a pipe, a file, a CI job).
    #[error(
        "the screen needs a terminal, but standard {stream} is not one; run tankwalk in a terminal, \
         or use the commands that print (`tankwalk log`, `tankwalk report`, `tankwalk --help`)"
    )]
    NotATerminal {
        /// `input` or `output`.
        stream: &'static str,
    },
    /// The terminal refused raw mode or the alternate screen.
    #[error("could not set up the terminal: {0}")]
    Setup(#[source] io::Error),
}

/// Checks that standard input and output are terminals.
pub fn check_terminal() -> Result<(), TerminalError> {
    if !io::stdin().is_terminal() {
        return Err(TerminalError::NotATerminal { stream: "input" });
    }
    if !io::stdout().is_terminal() {
        return Err(TerminalError::NotATerminal { stream: "output" });
    }
    Ok(())
}

/// True unless `NO_COLOR` is set to a non-empty value (<https://no-color.org>).
pub fn colour_wanted() -> bool {
    colour_wanted_from(std::env::var_os("NO_COLOR").as_deref())
}

fn colour_wanted_from(no_color: Option<&std::ffi::OsStr>) -> bool {
    no_color.is_none_or(|value| value.is_empty())
}

/// The terminal while the screen runs; dropping it restores the terminal.
pub struct Session {
    terminal: DefaultTerminal,
}

impl Session {
    /// Checks for a terminal, then enters raw mode and the alternate screen.
    pub fn start() -> Result<Session, TerminalError> {
        check_terminal()?;
        match ratatui::try_init() {
            Ok(terminal) => Ok(Session { terminal }),
            Err(err) => {
                // Raw mode may be on even though the alternate screen failed.
                let _ = ratatui::try_restore();
                Err(TerminalError::Setup(err))
            }
        }
    }
}

impl Deref for Session {
    type Target = DefaultTerminal;
    fn deref(&self) -> &DefaultTerminal {
        &self.terminal
    }
}

impl DerefMut for Session {
    fn deref_mut(&mut self) -> &mut DefaultTerminal {
        &mut self.terminal
    }
}

impl Drop for Session {
    fn drop(&mut self) {
        // On a panic the hook from `try_init` has already restored the
        // terminal and printed the message below the screen. Restoring twice
        // would leave the alternate screen twice, and the second time the
        // terminal puts the cursor back where the screen started, so the shell
        // prompt would overwrite the panic message (found by the pseudo-terminal test).
        if std::thread::panicking() {
            return;
        }
        let _ = self.terminal.show_cursor();
        let _ = ratatui::try_restore();
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use std::ffi::OsStr;

    #[test]
    fn no_color_turns_colour_off_only_when_non_empty() {
        assert!(colour_wanted_from(None));
        assert!(colour_wanted_from(Some(OsStr::new(""))));
        assert!(!colour_wanted_from(Some(OsStr::new("1"))));
    }
}
