//! The loop: the only code that touches the terminal and the records' store.
//!
//! Each turn draws a frame, waits for a key (or a resize, or a minute to pass),
//! hands it to the pure [`update`], and carries out the effects it returns:
//! a save goes to the store, which answers only once the records are on disk,
//! and that answer goes back to `update` as [`Input::Saved`]. Keys that arrive
//! while a save runs wait in the terminal's queue, so nothing is typed into a
//! tank that is not on screen.

use std::collections::VecDeque;
use std::io;
use std::time::Duration;

use chrono::{DateTime, FixedOffset};
use ratatui::Terminal;
use ratatui::backend::Backend;
use ratatui::crossterm::event::{self, Event};

use super::keymap::{Key, Keymap};
use super::state::{App, Effect, Input, update};
use super::terminal::{Session, TerminalError};
use super::view;
use crate::model::record::Record;
use crate::store::{Store, StoreError, TimeRange};

/// How long the loop waits for a key before it lets time pass (ages, due marks).
pub const TICK: Duration = Duration::from_secs(30);

/// How far back the screen loads records: the longest chart period.
pub const LOADED_DAYS: i64 = 90;

/// The records the screen shows: those taken in the last [`LOADED_DAYS`]
/// days (and later), with the corrections of them. A range scan of the time
/// index, so starting the screen costs the same with a year of history as
/// with ten (a correction of an older record is not applied anyway).
pub fn records_to_show(store: &dyn Store, now: DateTime<FixedOffset>) -> Result<Vec<Record>, StoreError> {
    let since = (now - chrono::Duration::days(LOADED_DAYS)).with_timezone(&chrono::Utc);
    let mut records = store.history(&[], &TimeRange::new(Some(since), None))?;
    // Oldest first, the order a history is built in.
    records.reverse();
    Ok(records)
}

/// Where the screen's records go.
pub trait Records {
    /// Saves `records` in one batch; returns only once they are durable.
    fn save(&mut self, records: &[Record]) -> Result<(), String>;
    /// Exports every record; returns where the files went.
    fn export(&mut self) -> Result<String, String>;
    /// Writes the report of the round under way; returns where it went.
    fn report(&mut self) -> Result<String, String> {
        Err("reports are not written from here".to_string())
    }
    /// Syncs with the shared folder; returns what happened and the records
    /// the screen should now show.
    fn sync(&mut self) -> Result<(String, Vec<Record>), String> {
        Err("there is no shared folder here".to_string())
    }
}

/// Where the loop's events come from: the terminal, or a script in tests.
pub trait Events {
    /// The next event, or `None` when `timeout` passed without one.
    fn next(&mut self, timeout: Duration) -> io::Result<Option<Event>>;
}

/// The terminal's events.
#[derive(Debug, Default)]
pub struct TerminalEvents;

impl Events for TerminalEvents {
    fn next(&mut self, timeout: Duration) -> io::Result<Option<Event>> {
        if event::poll(timeout)? { event::read().map(Some) } else { Ok(None) }
    }
}

/// Why the screen stopped before the person quit.
#[derive(Debug, thiserror::Error)]
pub enum RunError {
    /// The terminal could not be set up.
    #[error(transparent)]
    Terminal(#[from] TerminalError),
    /// Drawing or reading the terminal failed.
    #[error("the terminal failed: {0}")]
    Io(#[from] io::Error),
}

/// Runs the screen in the real terminal until the person quits. The terminal
/// is restored on every way out (quit, error, panic).
pub fn run(
    app: &mut App,
    keymap: &Keymap,
    records: &mut dyn Records,
    clock: &dyn Fn() -> DateTime<FixedOffset>,
) -> Result<(), RunError> {
    let mut session = Session::start()?;
    run_loop(&mut session, &mut TerminalEvents, app, keymap, records, clock)
}

/// The loop itself, on any backend and event source.
pub fn run_loop<B: Backend>(
    terminal: &mut Terminal<B>,
    events: &mut dyn Events,
    app: &mut App,
    keymap: &Keymap,
    records: &mut dyn Records,
    clock: &dyn Fn() -> DateTime<FixedOffset>,
) -> Result<(), RunError> {
    loop {
        terminal.draw(|frame| view::render(app, keymap, frame)).map_err(|e| io::Error::other(e.to_string()))?;
        let input = match events.next(TICK)? {
            None => Input::Tick,
            Some(Event::Key(key_event)) => match Key::from_event(&key_event) {
                Some(key) => Input::Key(key),
                // Releases and repeats of nothing we bind.
                None => continue,
            },
            Some(Event::Resize(..)) => Input::Resize,
            Some(_) => continue,
        };
        let mut effects: VecDeque<Effect> = update(app, keymap, input, clock()).into();
        while let Some(effect) = effects.pop_front() {
            let answer = match effect {
                Effect::Quit => return Ok(()),
                // The status says "saved" only after this returns from the flush.
                Effect::Save(batch) => Input::Saved(records.save(&batch).map(|()| batch)),
                Effect::Export => Input::Exported(records.export()),
                Effect::Report => Input::Reported(records.report()),
                Effect::Sync => Input::Synced(records.sync()),
            };
            effects.extend(update(app, keymap, answer, clock()));
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use crate::model::record::{Correction, Reading, RecordBody, Target};
    use crate::store::MemStore;

    fn reading_at(store: &MemStore, at: DateTime<FixedOffset>) -> Record {
        let mut r = Reading::new(Target::Tank("Q1".into()));
        r.measurements.ph = Some(7.2);
        Record::new(store.device(), "Ana", at, RecordBody::Reading(r))
    }

    #[test]
    fn the_screen_loads_the_last_ninety_days_and_their_corrections() {
        let now = DateTime::parse_from_rfc3339("2026-12-01T07:30:00+01:00").unwrap();
        let mut store = MemStore::new();
        let old = reading_at(&store, now - chrono::Duration::days(LOADED_DAYS + 1));
        let recent = reading_at(&store, now - chrono::Duration::days(LOADED_DAYS - 1));
        let fix = Record::new(
            store.device(),
            "Ana",
            now,
            RecordBody::Correction(Correction {
                supersedes: recent.id,
                replacement: None,
                reason: "wrong tank".into(),
            }),
        );
        store.append(&[old.clone(), recent.clone(), fix.clone()]).unwrap();
        let shown: Vec<_> = records_to_show(&store, now).unwrap().into_iter().map(|r| r.id).collect();
        assert!(shown.contains(&recent.id) && shown.contains(&fix.id), "{shown:?}");
        assert!(!shown.contains(&old.id));
    }
}
